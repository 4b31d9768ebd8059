// Front end: formula text -> expression graph, with muParser 2.3.3 owning the grammar.
//
// Steps (each guards a muParser pitfall, see PITFALLS.md):
//  1. length and blank checks, then a light scan of our own that runs before muParser sees
//     the text: nesting depth (kMaxNestingDepth), unbalanced parentheses, every unknown name
//     (muParser stops at the first), argument counts, stray commas (muParser would return
//     several results), and '=' (an assignment in muParser);
//  2. a fresh mu::Parser per call (never shared between threads) with every function and
//     the sign operators registered through our callbacks, the optimizer off, and one
//     Eval() because muParser reports syntax errors only when it first evaluates;
//  3. the bytecode (reverse Polish) read token by token into our graph.
#include "core/expr/graph.h"

#include <muParser.h>

#include <algorithm>
#include <cctype>
#include <cstring>
#include <cmath>
#include <deque>
#include <numbers>
#include <set>

namespace sw::expr {

namespace {

struct FunctionEntry {
    const char* name;
    Op op;
    int argc;  // -1: two or more arguments
};

// muParser's own `log` is the natural logarithm (checked on 2.3.3); we keep that meaning.
const FunctionEntry kFunctions[] = {
    {"sin", Op::Sin, 1},     {"cos", Op::Cos, 1},     {"tan", Op::Tan, 1},       {"asin", Op::Asin, 1},
    {"acos", Op::Acos, 1},   {"atan", Op::Atan, 1},   {"sinh", Op::Sinh, 1},     {"cosh", Op::Cosh, 1},
    {"tanh", Op::Tanh, 1},   {"asinh", Op::Asinh, 1}, {"acosh", Op::Acosh, 1},   {"atanh", Op::Atanh, 1},
    {"exp", Op::Exp, 1},     {"log", Op::Log, 1},     {"ln", Op::Log, 1},        {"log10", Op::Log10, 1},
    {"log2", Op::Log2, 1},   {"sqrt", Op::Sqrt, 1},   {"abs", Op::Abs, 1},       {"sign", Op::Sign, 1},
    {"atan2", Op::Atan2, 2}, {"min", Op::Min, -1},    {"max", Op::Max, -1},
};

const FunctionEntry* findFunction(const std::string& name) {
    for (const auto& f : kFunctions)
        if (name == f.name) return &f;
    return nullptr;
}

double callUnary(void* entry, double a) { return apply1(static_cast<const FunctionEntry*>(entry)->op, a); }
double callBinary(void* entry, double a, double b) { return apply2(static_cast<const FunctionEntry*>(entry)->op, a, b); }
double callVariadic(void* entry, const double* args, int count) {
    const Op op = static_cast<const FunctionEntry*>(entry)->op;
    double r = args[0];
    for (int i = 1; i < count; ++i) r = apply2(op, r, args[i]);
    return r;
}
double unaryMinus(double a) { return -a; }
double unaryPlus(double a) { return a; }

bool isNameStart(char c) { return std::isalpha(static_cast<unsigned char>(c)) || c == '_'; }
bool isNameChar(char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; }

std::string quoted(const std::string& s) { return "'" + s + "'"; }

std::string joinNames(const std::vector<std::string>& names) {
    std::string out;
    for (std::size_t i = 0; i < names.size(); ++i) out += (i ? ", " : "") + names[i];
    return out;
}

std::string argumentWord(int n) { return n == 1 ? "1 argument" : std::to_string(n) + " arguments"; }

// Step 1: our own scan, for the errors muParser reports badly or not at all.
void prescan(const std::string& text, const std::vector<std::string>& symbols) {
    struct Open {
        int position;
        const FunctionEntry* function;  // null for a plain parenthesis
        int namePosition;
        int commas;
        bool empty;
    };
    std::vector<Open> open;
    std::vector<std::string> unknown;
    int firstUnknown = -1;
    const auto isSymbol = [&](const std::string& n) { return std::find(symbols.begin(), symbols.end(), n) != symbols.end(); };
    const int size = static_cast<int>(text.size());
    for (int i = 0; i < size;) {
        const char ch = text[i];
        if (std::isspace(static_cast<unsigned char>(ch))) {
            ++i;
            continue;
        }
        if (!open.empty() && ch != ')') open.back().empty = false;
        if (std::isdigit(static_cast<unsigned char>(ch)) || (ch == '.' && i + 1 < size && std::isdigit(static_cast<unsigned char>(text[i + 1])))) {
            while (i < size && (std::isdigit(static_cast<unsigned char>(text[i])) || text[i] == '.')) ++i;
            if (i < size && (text[i] == 'e' || text[i] == 'E')) {
                int j = i + 1;
                if (j < size && (text[j] == '+' || text[j] == '-')) ++j;
                if (j < size && std::isdigit(static_cast<unsigned char>(text[j]))) {
                    i = j;
                    while (i < size && std::isdigit(static_cast<unsigned char>(text[i]))) ++i;
                }
            }
            continue;
        }
        if (isNameStart(ch)) {
            const int start = i;
            while (i < size && isNameChar(text[i])) ++i;
            const std::string name = text.substr(start, i - start);
            int next = i;
            while (next < size && std::isspace(static_cast<unsigned char>(text[next]))) ++next;
            const bool called = next < size && text[next] == '(';
            if (called) {
                const FunctionEntry* f = findFunction(name);
                if (!f) {
                    std::string reason = isSymbol(name) ? quoted(name) + " is a variable, not a function"
                                                        : "unknown function " + quoted(name);
                    throw FormulaError(reason, text, start);
                }
                open.push_back({next, f, start, 0, true});
                if (static_cast<int>(open.size()) > kMaxNestingDepth)
                    throw FormulaError("parentheses are nested more than " + std::to_string(kMaxNestingDepth) + " deep", text, next);
                i = next + 1;
            } else if (!isSymbol(name) && name != "pi" && name != "e" && !findFunction(name)) {
                if (std::find(unknown.begin(), unknown.end(), name) == unknown.end()) unknown.push_back(name);
                if (firstUnknown < 0) firstUnknown = start;
            }
            continue;
        }
        switch (ch) {
        case '(':
            open.push_back({i, nullptr, i, 0, true});
            if (static_cast<int>(open.size()) > kMaxNestingDepth)
                throw FormulaError("parentheses are nested more than " + std::to_string(kMaxNestingDepth) + " deep", text, i);
            break;
        case ')': {
            if (open.empty()) throw FormulaError("this closing parenthesis has no opening one", text, i);
            const Open o = open.back();
            open.pop_back();
            if (o.function) {
                const int args = o.empty ? 0 : o.commas + 1;
                const std::string name = text.substr(o.namePosition, o.position - o.namePosition);
                std::string trimmed = name;
                while (!trimmed.empty() && std::isspace(static_cast<unsigned char>(trimmed.back()))) trimmed.pop_back();
                if (o.function->argc >= 0 && args != o.function->argc)
                    throw FormulaError(trimmed + " takes " + argumentWord(o.function->argc) + ", got " + std::to_string(args), text,
                                       o.namePosition);
                if (o.function->argc < 0 && args < 2)
                    throw FormulaError(trimmed + " takes 2 or more arguments, got " + std::to_string(args), text, o.namePosition);
            } else if (o.empty) {
                throw FormulaError("empty parentheses", text, o.position);
            }
            break;
        }
        case ',':
            if (open.empty() || !open.back().function)
                throw FormulaError("a comma only separates function arguments (for a decimal number write a point: 1.5, not 1,5)",
                                   text, i);
            ++open.back().commas;
            open.back().empty = true;  // an argument must follow
            break;
        case '=': {
            const bool partOfComparison = (i > 0 && std::strchr("<>!=", text[i - 1])) || (i + 1 < size && text[i + 1] == '=');
            if (!partOfComparison)
                throw FormulaError("'=' would assign a value; write '==' to compare", text, i);
            if (i + 1 < size && text[i + 1] == '=') ++i;
            break;
        }
        default:
            break;
        }
        ++i;
    }
    if (!open.empty()) throw FormulaError("this parenthesis is never closed", text, open.back().position);
    if (!unknown.empty()) {
        std::string reason = (unknown.size() == 1 ? "unknown name " : "unknown names ");
        for (std::size_t k = 0; k < unknown.size(); ++k) reason += (k ? ", " : "") + quoted(unknown[k]);
        reason += symbols.empty() ? " (no variables are declared)" : "; the variables are " + joinNames(symbols);
        throw FormulaError(reason, text, firstUnknown, unknown);
    }
}

std::string describeParserError(const mu::ParserError& e) {
    const std::string token = e.GetToken();
    switch (e.GetCode()) {
    case mu::ecUNEXPECTED_OPERATOR: return "unexpected operator " + quoted(token);
    case mu::ecUNASSIGNABLE_TOKEN: return "cannot read " + quoted(token);
    case mu::ecUNEXPECTED_EOF: return "the formula ends too early";
    case mu::ecUNEXPECTED_ARG_SEP: return "unexpected comma";
    case mu::ecUNEXPECTED_ARG: return "unexpected argument";
    case mu::ecUNEXPECTED_VAL: return "unexpected number " + quoted(token) + " (is an operator missing before it?)";
    case mu::ecUNEXPECTED_VAR: return "unexpected name " + quoted(token) + " (is an operator missing before it?)";
    case mu::ecUNEXPECTED_PARENS: return "unexpected parenthesis";
    case mu::ecMISSING_PARENS: return "a parenthesis is not closed";
    case mu::ecUNEXPECTED_FUN: return "unexpected function " + quoted(token) + " (is an operator missing before it?)";
    case mu::ecTOO_MANY_PARAMS: return "too many arguments for " + quoted(token);
    case mu::ecTOO_FEW_PARAMS: return "too few arguments for " + quoted(token);
    case mu::ecUNEXPECTED_CONDITIONAL: return "unexpected '?'";
    case mu::ecMISSING_ELSE_CLAUSE: return "'?' needs a ':' part";
    case mu::ecMISPLACED_COLON: return "':' without a '?' before it";
    case mu::ecINVALID_CHARACTERS_FOUND: return "the formula contains characters that cannot be read";
    case mu::ecEXPRESSION_TOO_LONG: return "the formula is too long";
    case mu::ecIDENTIFIER_TOO_LONG: return "a name is too long (over 255 characters)";
    default: return "cannot read the formula: " + e.GetMsg();
    }
}

void checkSymbolNames(const std::vector<std::string>& symbols) {
    std::set<std::string> seen;
    for (const auto& s : symbols) {
        if (s.empty() || !isNameStart(s[0]) || !std::all_of(s.begin(), s.end(), isNameChar))
            throw FormulaError(quoted(s) + " is not a valid variable name (letters, digits and _, not starting with a digit)", "", -1);
        if (findFunction(s)) throw FormulaError(quoted(s) + " cannot name a variable: it is a function", "", -1);
        if (!seen.insert(s).second) throw FormulaError("the variable " + quoted(s) + " is declared twice", "", -1);
    }
}

}  // namespace

Expression Expression::parse(const std::string& text, const std::vector<std::string>& symbols) {
    if (text.size() > kMaxFormulaLength)
        throw FormulaError("the formula has " + std::to_string(text.size()) + " characters; the limit is " +
                               std::to_string(kMaxFormulaLength),
                           text.substr(0, 80), -1);
    if (std::all_of(text.begin(), text.end(), [](char c) { return std::isspace(static_cast<unsigned char>(c)); }))
        throw FormulaError("the formula is empty", text, -1);
    checkSymbolNames(symbols);
    prescan(text, symbols);

    std::vector<double> values(symbols.size(), 0.5);
    std::deque<double> strays;  // variables muParser met that we did not declare (a guard; prescan finds them first)
    std::vector<std::string> strayNames;
    struct Factory {
        std::deque<double>* strays;
        std::vector<std::string>* names;
    } factory{&strays, &strayNames};

    mu::Parser parser;
    try {
        parser.ClearFun();
        parser.ClearConst();
        parser.ClearInfixOprt();
        parser.ClearPostfixOprt();
        parser.ClearOprt();
        parser.EnableOptimizer(false);
        for (const auto& f : kFunctions) {
            void* entry = const_cast<FunctionEntry*>(&f);
            if (f.argc == 1) parser.DefineFunUserData(f.name, &callUnary, entry, false);
            else if (f.argc == 2) parser.DefineFunUserData(f.name, &callBinary, entry, false);
            else parser.DefineFunUserData(f.name, &callVariadic, entry, false);
        }
        parser.DefineInfixOprt("-", &unaryMinus, mu::prINFIX, false);
        parser.DefineInfixOprt("+", &unaryPlus, mu::prINFIX, false);
        for (std::size_t i = 0; i < symbols.size(); ++i) parser.DefineVar(symbols[i], &values[i]);
        // A declared symbol named pi or e shadows the constant.
        if (std::find(symbols.begin(), symbols.end(), "pi") == symbols.end()) parser.DefineConst("pi", std::numbers::pi);
        if (std::find(symbols.begin(), symbols.end(), "e") == symbols.end()) parser.DefineConst("e", std::numbers::e);
        parser.SetVarFactory(
            [](const mu::char_type* name, void* user) -> double* {
                auto* f = static_cast<Factory*>(user);
                f->names->push_back(name);
                return &f->strays->emplace_back(0.0);
            },
            &factory);
        parser.SetExpr(text);
        parser.Eval();  // muParser reports syntax errors only here
    } catch (const mu::ParserError& e) {
        // muParser may place an error one past the end (e.g. "1+"); the caret then sits after the text.
        const int size = static_cast<int>(text.size());
        int position = e.GetPos() < 0 ? -1 : std::min(e.GetPos(), size);
        if (e.GetCode() == mu::ecUNEXPECTED_EOF) position = size;
        throw FormulaError(describeParserError(e), text, position);
    }
    if (!strayNames.empty()) {
        auto pos = text.find(strayNames.front());
        throw FormulaError("unknown name " + quoted(strayNames.front()) + "; the variables are " + joinNames(symbols), text,
                           pos == std::string::npos ? -1 : static_cast<int>(pos), {strayNames.front()});
    }
    if (parser.GetNumResults() != 1)
        throw FormulaError("the formula gives " + std::to_string(parser.GetNumResults()) +
                               " results; a comma only separates function arguments (for a decimal number write a point: 1.5)",
                           text, -1);

    auto graph = std::make_shared<Graph>(symbols);
    const mu::ParserByteCode& code = parser.GetByteCode();
    const mu::SToken* tokens = code.GetBase();
    std::vector<const Node*> stack;
    struct Branch {
        const Node* condition;
        const Node* whenTrue = nullptr;
    };
    std::vector<Branch> branches;
    auto internal = [&](const std::string& what) {
        return FormulaError("internal error reading muParser's bytecode (" + what + "); please report this formula", text, -1);
    };
    auto pop = [&]() {
        if (stack.empty()) throw internal("stack underflow");
        const Node* n = stack.back();
        stack.pop_back();
        return n;
    };
    const auto rawMinus = reinterpret_cast<mu::erased_fun_type>(&unaryMinus);
    const auto rawPlus = reinterpret_cast<mu::erased_fun_type>(&unaryPlus);
    bool ended = false;
    for (std::size_t k = 0; k < code.GetSize() && !ended; ++k) {
        const mu::SToken& t = tokens[k];
        switch (t.Cmd) {
        case mu::cmVAR: {
            const auto index = t.Val.ptr - values.data();
            if (index < 0 || index >= static_cast<std::ptrdiff_t>(values.size())) throw internal("unknown variable address");
            stack.push_back(graph->symbol(static_cast<int>(index)));
            break;
        }
        case mu::cmVAL: stack.push_back(graph->constant(t.Val.data2)); break;
        case mu::cmLE:
        case mu::cmGE:
        case mu::cmNEQ:
        case mu::cmEQ:
        case mu::cmLT:
        case mu::cmGT:
        case mu::cmADD:
        case mu::cmSUB:
        case mu::cmMUL:
        case mu::cmDIV:
        case mu::cmPOW:
        case mu::cmLAND:
        case mu::cmLOR: {
            static const Op map[] = {Op::LessEq, Op::GreaterEq, Op::NotEqual, Op::Equal, Op::Less, Op::Greater, Op::Add,
                                     Op::Sub,    Op::Mul,       Op::Div,      Op::Pow,   Op::And,  Op::Or};
            const Node* b = pop();
            const Node* a = pop();
            stack.push_back(graph->make(map[t.Cmd], a, b));
            break;
        }
        case mu::cmASSIGN: throw FormulaError("'=' would assign a value; write '==' to compare", text, -1);
        case mu::cmIF: branches.push_back({pop()}); break;
        case mu::cmELSE:
            if (branches.empty()) throw internal("else without if");
            branches.back().whenTrue = pop();
            break;
        case mu::cmENDIF: {
            if (branches.empty() || !branches.back().whenTrue) throw internal("endif without else");
            const Node* whenFalse = pop();
            const Branch b = branches.back();
            branches.pop_back();
            stack.push_back(graph->make(Op::Select, b.condition, b.whenTrue, whenFalse));
            break;
        }
        case mu::cmFUNC: {
            const auto& cb = t.Fun.cb;
            if (cb._pRawFun == rawMinus && t.Fun.argc == 1) {
                stack.push_back(graph->make(Op::Neg, pop()));
                break;
            }
            if (cb._pRawFun == rawPlus && t.Fun.argc == 1) break;  // unary plus: the operand stays
            const FunctionEntry* f = static_cast<const FunctionEntry*>(cb._pUserData);
            const bool ours = f >= std::begin(kFunctions) && f < std::end(kFunctions);
            if (!ours) throw internal("unknown function callback");
            const int argc = t.Fun.argc >= 0 ? t.Fun.argc : -t.Fun.argc;
            if (argc < 1 || static_cast<std::size_t>(argc) > stack.size()) throw internal("bad argument count");
            std::vector<const Node*> args(stack.end() - argc, stack.end());
            stack.resize(stack.size() - argc);
            if (f->argc == 1) {
                stack.push_back(graph->make(f->op, args[0]));
            } else {
                // min/max of several arguments fold left to right: min(a,b,c) = min(min(a,b),c).
                const Node* r = args[0];
                for (int i = 1; i < argc; ++i) r = graph->make(f->op, r, args[i]);
                stack.push_back(r);
            }
            break;
        }
        case mu::cmEND: ended = true; break;
        default: throw internal("token code " + std::to_string(static_cast<int>(t.Cmd)));
        }
    }
    if (stack.size() != 1 || !branches.empty()) throw internal("unbalanced stack");
    return Expression(graph, stack.back());
}

}  // namespace sw::expr
