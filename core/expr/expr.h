#pragma once
// Public face of the expression engine (core/expr). Other folders include only this header.
//
//   formula text --parse--> Expression (hash-consed graph) --derivative/gradient/hessian-->
//   Expressions --compile--> Program (one straight-line program, shared subexpressions once)
//
// Parsing throws FormulaError at this boundary; everything after parsing is exception-free
// for finite and non-finite inputs alike (non-finite results are values).
// NOTE for implementers: keep these signatures; add to them rather than change them,
// other folders (objective, fit, analyze, app) are written against this header.

#include <cstddef>
#include <cstdint>
#include <memory>
#include <stdexcept>
#include <string>
#include <vector>

namespace sw::expr {

// A formula could not be read. position is the 0-based character offset into formula
// (or -1 when no single place is to blame); message is one sentence naming the problem.
class FormulaError : public std::runtime_error {
public:
    FormulaError(std::string message, std::string formula, int position);
    const std::string& formula() const { return formula_; }
    int position() const { return position_; }
    const std::string& reason() const { return reason_; }
    // Three lines: the message with its column, the formula, a caret under the position.
    std::string withCaret() const;

private:
    std::string reason_;
    std::string formula_;
    int position_;
};

// Documented limits (also in docs/expr.md).
inline constexpr std::size_t kMaxFormulaLength = 10000;  // characters of user-typed text
inline constexpr int kMaxNestingDepth = 200;              // parentheses/function nesting

class Graph;  // owns the hash-consed nodes; shared by the expressions built from it
struct Node;

// An immutable handle on one node of a graph. Cheap to copy. Equal subtrees built in the
// same graph are the same node, so == is identity.
class Expression {
public:
    Expression() = default;

    // Parses `text` over the named symbols (variables, data columns, parameters...).
    // A symbol named pi or e shadows the constant of that name.
    // Throws FormulaError (syntax, unknown name, wrong argument count, empty formula,
    // several results, assignment, over the length or nesting limit).
    static Expression parse(const std::string& text, const std::vector<std::string>& symbols);

    bool valid() const { return node_ != nullptr; }
    const std::vector<std::string>& symbols() const;
    // Symbols the formula actually uses, in declaration order.
    std::vector<std::string> usedSymbols() const;

    // d/d(symbols()[symbol]), simplified.
    Expression derivative(int symbol) const;
    // Readable formula text that muParser re-parses to the same value.
    std::string toText() const;
    // Value at one point (symbols in declaration order); slow path for tests and tools.
    double evaluate(const std::vector<double>& values) const;
    bool isConstant() const;
    std::size_t nodeCount() const;  // distinct nodes reachable from this one

    bool operator==(const Expression& other) const { return node_ == other.node_; }

    // Internal.
    Expression(std::shared_ptr<Graph> graph, const Node* node) : graph_(std::move(graph)), node_(node) {}
    const Node* node() const { return node_; }
    const std::shared_ptr<Graph>& graph() const { return graph_; }

private:
    std::shared_ptr<Graph> graph_;
    const Node* node_ = nullptr;
};

// Gradient with respect to the listed symbol indices (all symbols when empty).
std::vector<Expression> gradient(const Expression& f, const std::vector<int>& wrt = {});
// Upper triangle of the Hessian, row-major: (0,0),(0,1)...(0,n-1),(1,1),... n(n+1)/2 entries.
std::vector<Expression> hessianUpper(const Expression& f, const std::vector<int>& wrt = {});

// One straight-line program computing several outputs of the same inputs (the graph's
// symbols, in order) with shared subexpressions computed once. Immutable; share freely
// across threads, each thread using its own Workspace.
class Program {
public:
    struct Workspace {
        std::vector<double> registerValues;  // one value per register (single-point); not "slots", a Qt macro
        std::vector<double> block;           // kBlockSize values per register (block evaluation)
        std::vector<double*> rows;           // where each register's block lives this time
        std::vector<char> uniform;           // per instruction: same value at every point of the call
        std::uint64_t preparedFor = 0;       // id of the program whose constants are loaded
        std::uint64_t blockPreparedFor = 0;  // the same for the block registers
    };
    // Points per internal block of evaluateBlock (registers of this many doubles).
    static constexpr std::size_t kBlockSize = 128;
    // An input of a block evaluation: `count` values at data[i*stride]; stride 0 means one
    // value for the whole block (e.g. a parameter while rows vary).
    struct BlockInput {
        const double* data = nullptr;
        std::size_t stride = 1;
    };

    Program() = default;
    static Program compile(const std::vector<Expression>& outputs);

    int inputCount() const;
    int outputCount() const;
    std::size_t instructionCount() const;
    // Instructions of the single-point form evaluate() runs: fewer, since an operation whose
    // result has one reader is fused into it where a fused opcode exists (same bits).
    std::size_t singlePointInstructionCount() const;
    Workspace makeWorkspace() const;

    // inputs[inputCount()] -> outputs[outputCount()].
    void evaluate(const double* inputs, double* outputs, Workspace& workspace) const;
    // Structure-of-arrays: outputs[o] points to `count` doubles. Any count is accepted;
    // the program works through it in internal blocks. Instructions that depend only on
    // constants and stride-0 inputs are computed once per block and broadcast.
    void evaluateBlock(const BlockInput* inputs, std::size_t count, double* const* outputs,
                       Workspace& workspace) const;

    // Internal.
    struct Impl;
    explicit Program(std::shared_ptr<const Impl> impl) : impl_(std::move(impl)) {}
    const Impl* impl() const { return impl_.get(); }

private:
    std::shared_ptr<const Impl> impl_;
};

// Value, gradient and full Hessian of one scalar formula in its symbols, compiled once.
// Output layout of program(): [f, g_0..g_{n-1}, H upper triangle row-major] for order 2,
// [f, g...] for order 1, [f] for order 0.
class DerivativeSet {
public:
    DerivativeSet() = default;
    // Throws FormulaError like Expression::parse.
    DerivativeSet(const std::string& text, const std::vector<std::string>& variables, int order = 2);
    DerivativeSet(const Expression& f, int order = 2);
    // Derivatives with respect to the listed symbols only (the others, e.g. data columns or
    // fixed constants, stay program inputs). variables() names the listed symbols.
    DerivativeSet(const Expression& f, const std::vector<int>& wrt, int order);

    int order() const { return order_; }
    int dimension() const { return static_cast<int>(variables_.size()); }
    const std::vector<std::string>& variables() const { return variables_; }
    // Symbol indices (program inputs) the derivatives are taken with respect to.
    const std::vector<int>& wrt() const { return wrt_; }
    const Expression& function() const { return function_; }
    const std::vector<Expression>& gradient() const { return gradient_; }
    const std::vector<Expression>& hessianUpper() const { return hessianUpper_; }
    const Program& program() const { return program_; }
    static std::size_t hessianIndex(int i, int j, int n);  // position of (i,j) in the upper triangle

private:
    int order_ = 2;
    std::vector<std::string> variables_;
    std::vector<int> wrt_;
    Expression function_;
    std::vector<Expression> gradient_;
    std::vector<Expression> hessianUpper_;
    Program program_;
};

// Evaluates program outputs over an N x N grid of the first two inputs (others fixed at
// `fixedInputs`), using every hardware thread. outputs[o] holds nx*ny values, row-major
// with x fastest. Returns wall-clock seconds.
struct GridSpec {
    double xMin = -1, xMax = 1, yMin = -1, yMax = 1;
    int nx = 100, ny = 100;
    int xInput = 0, yInput = 1;       // which program inputs vary along x and y
    std::vector<double> fixedInputs;  // values for every input (x/y entries ignored)
};
double evaluateGrid(const Program& program, const GridSpec& grid, std::vector<std::vector<double>>& outputs,
                    int threads = 0 /* 0 = hardware concurrency */);

}  // namespace sw::expr
