// Graph -> formula text that muParser 2.3.3 reads back to the same value.
//
// Parentheses are minimal for muParser's precedence (?: < || < && < comparisons < + - <
// * / and unary minus < ^, with ^ right-associative) except that an equal-precedence right
// operand is always parenthesised, so a+(b+c) keeps its rounding order. Numbers are the
// shortest decimal text that reads back to the same double (std::to_chars, C locale).
// muParser has no literal for infinity or NaN, so a non-finite constant prints as the
// division muParser evaluates to it: (1/0), (-1/0), (0/0). The doubles pi and e print as
// `pi` and `e` unless a symbol of that name shadows the constant.
// The pass is iterative (any depth is safe); text longer than kMaxPrintedLength is replaced
// by a note, since a shared subexpression prints once per use.
#include "core/expr/graph.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <numbers>
#include <unordered_map>

namespace sw::expr {

namespace {

constexpr std::size_t kMaxPrintedLength = 4'000'000;

std::string formatConstant(double v, bool piFree, bool eFree) {
    if (std::isnan(v)) return "(0/0)";
    if (std::isinf(v)) return v > 0 ? "(1/0)" : "(-1/0)";
    const double magnitude = std::fabs(v);
    std::string body;
    if (piFree && magnitude == std::numbers::pi) body = "pi";
    else if (eFree && magnitude == std::numbers::e) body = "e";
    else {
        char buffer[64];
        auto result = std::to_chars(buffer, buffer + sizeof buffer, magnitude);
        body.assign(buffer, result.ptr);
    }
    return std::signbit(v) ? "-" + body : body;
}

bool negativeLike(const Node* n) { return n->op == Op::Neg || (n->op == Op::Constant && std::signbit(n->value) && !std::isnan(n->value)); }

std::string wrap(const std::string& s) { return "(" + s + ")"; }

const char* infix(Op op) {
    switch (op) {
    case Op::Add: return " + ";
    case Op::Sub: return " - ";
    case Op::Mul: return "*";
    case Op::Div: return "/";
    case Op::Pow: return "^";
    case Op::Less: return " < ";
    case Op::LessEq: return " <= ";
    case Op::Greater: return " > ";
    case Op::GreaterEq: return " >= ";
    case Op::Equal: return " == ";
    case Op::NotEqual: return " != ";
    case Op::And: return " && ";
    case Op::Or: return " || ";
    default: return nullptr;
    }
}

}  // namespace

std::string Expression::toText() const {
    if (!valid()) return "";
    const auto& names = symbols();
    const bool piFree = std::find(names.begin(), names.end(), "pi") == names.end();
    const bool eFree = std::find(names.begin(), names.end(), "e") == names.end();
    const std::vector<const Node*> order = topologicalOrder({node_});

    // Lengths first (saturating), so a huge text is never built.
    std::unordered_map<const Node*, std::size_t> length;
    auto add = [](std::size_t x, std::size_t y) { return std::min(kMaxPrintedLength + 1, x + y); };
    for (const Node* n : order) {
        std::size_t len = 0;
        if (n->op == Op::Constant) len = 26;
        else if (n->op == Op::Symbol) len = names[n->symbol].size();
        else len = 12;
        for (const Node* c : {n->a, n->b, n->c})
            if (c) len = add(len, length[c] + 2);
        length[n] = len;
    }
    if (length[node_] > kMaxPrintedLength)
        return "(formula too long to print: over " + std::to_string(kMaxPrintedLength) + " characters)";

    std::unordered_map<const Node*, std::string> text;
    for (const Node* n : order) {
        std::string s;
        const int p = precedence(n);
        switch (arity(n->op)) {
        case 0: s = n->op == Op::Constant ? formatConstant(n->value, piFree, eFree) : names[n->symbol]; break;
        case 1: {
            const std::string& inner = text[n->a];
            if (n->op == Op::Neg) s = "-" + (precedence(n->a) <= 6 ? wrap(inner) : inner);
            else s = std::string(opName(n->op)) + wrap(inner);
            break;
        }
        case 2: {
            const std::string& left = text[n->a];
            const std::string& right = text[n->b];
            if (const char* symbol = infix(n->op)) {
                const int pl = precedence(n->a), pr = precedence(n->b);
                bool wrapLeft, wrapRight;
                if (n->op == Op::Pow) {
                    wrapLeft = pl <= p;
                    wrapRight = pr < p;
                } else {
                    wrapLeft = pl < p;
                    wrapRight = pr <= p || negativeLike(n->b);
                }
                s = (wrapLeft ? wrap(left) : left) + symbol + (wrapRight ? wrap(right) : right);
            } else {
                s = std::string(opName(n->op)) + "(" + left + ", " + right + ")";
            }
            break;
        }
        default: {
            const std::string& c = text[n->a];
            const std::string& t = text[n->b];
            const std::string& f = text[n->c];
            s = (precedence(n->a) <= 0 ? wrap(c) : c) + " ? " + (precedence(n->b) <= 0 ? wrap(t) : t) + " : " + f;
            break;
        }
        }
        text[n] = std::move(s);
    }
    return text[node_];
}

}  // namespace sw::expr
