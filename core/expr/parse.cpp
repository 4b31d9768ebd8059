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
#include "core/expr/number_text.h"

#include <muParser.h>

#include <algorithm>
#include <cctype>
#include <cstdint>
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

// At most this many unknown names (and declared variables) are listed in one message.
constexpr std::size_t kMaxListedNames = 10;

std::string cappedList(const std::vector<std::string>& names, bool quote) {
    std::string out;
    const std::size_t shown = std::min(names.size(), kMaxListedNames);
    for (std::size_t i = 0; i < shown; ++i) out += (i ? ", " : "") + (quote ? quoted(names[i]) : names[i]);
    if (names.size() > shown) out += " and " + std::to_string(names.size() - shown) + " more";
    return out;
}

std::string hexByte(unsigned char c) {
    static const char* digits = "0123456789ABCDEF";
    return std::string("0x") + digits[c >> 4] + digits[c & 15];
}

std::string codePointText(std::uint32_t cp) {
    static const char* digits = "0123456789ABCDEF";
    std::string hex;
    for (int shift = cp > 0xFFFF ? 20 : 12; shift >= 0; shift -= 4) hex += digits[(cp >> shift) & 15];
    return "U+" + hex;
}

const char* controlName(unsigned char c) {
    static const char* names[32] = {"NUL", "SOH", "STX", "ETX", "EOT", "ENQ", "ACK", "BEL", "BS", "TAB", "LF",
                                    "VT",  "FF",  "CR",  "SO",  "SI",  "DLE", "DC1", "DC2", "DC3", "DC4", "NAK",
                                    "SYN", "ETB", "CAN", "EM",  "SUB", "ESC", "FS",  "GS",  "RS",  "US"};
    return c < 32 ? names[c] : "DEL";
}

// Hints for characters people paste from documents.
std::string nonAsciiHint(std::uint32_t cp) {
    switch (cp) {
        case 0x00D7: case 0x22C5: case 0x00B7: case 0x2219: return "; write * to multiply";
        case 0x2212: case 0x2013: case 0x2014: return "; write the ASCII '-'";
        case 0x00F7: case 0x2215: return "; write / to divide";
        case 0x00B2: return "; write ^2";
        case 0x00B3: return "; write ^3";
        case 0x2264: return "; write <=";
        case 0x2265: return "; write >=";
        case 0x2260: return "; write !=";
        case 0x03C0: return "; write pi";
        case 0x00A0: case 0x2009: case 0x202F: return "; a non-breaking or thin space: write a plain space";
        default: return "";
    }
}

// Step 0: every byte must be printable ASCII or plain white space. Control bytes, invalid
// UTF-8 and non-ASCII characters are named by code and column (never echoed raw), so a NUL
// cannot cut the message short and a pasted 'x²' or 'α' is not misread as another name.
void checkCharacters(const std::string& text) {
    const int size = static_cast<int>(text.size());
    for (int i = 0; i < size;) {
        const auto c = static_cast<unsigned char>(text[i]);
        if (c == ' ' || c == '\t' || c == '\n' || c == '\r') {
            ++i;
            continue;
        }
        if (c < 0x20 || c == 0x7F)
            throw FormulaError(std::string("control character ") + controlName(c) + " (" + codePointText(c) +
                                   ") in the formula; formulas are plain text",
                               text, i);
        if (c < 0x80) {
            switch (c) {
                case '"':
                case '\'':
                    throw FormulaError("quotes have no meaning in a formula (names and numbers are written without them)",
                                       text, i);
                case '[':
                case ']':
                case '{':
                case '}':
                    throw FormulaError(std::string("'") + static_cast<char>(c) +
                                           "' has no meaning in a formula; group with ( and )",
                                       text, i);
                case ';':
                    throw FormulaError("';' has no meaning in a formula (one formula only; a comma separates "
                                       "function arguments)",
                                       text, i);
                case '$': case '#': case '@': case '~': case '`': case '\\': case '%':
                    throw FormulaError(std::string("'") + static_cast<char>(c) + "' has no meaning in a formula", text, i);
                default:
                    ++i;
                    continue;
            }
        }
        // UTF-8: decode one character or name the byte that is not UTF-8.
        int length = c >= 0xF0 && c <= 0xF4 ? 4 : c >= 0xE0 ? 3 : c >= 0xC2 && c <= 0xDF ? 2 : 0;
        if (c >= 0xF5) length = 0;
        std::uint32_t cp = length == 2 ? c & 0x1F : length == 3 ? c & 0x0F : c & 0x07;
        bool valid = length > 0 && i + length <= size;
        for (int k = 1; valid && k < length; ++k) {
            const auto next = static_cast<unsigned char>(text[i + k]);
            if ((next & 0xC0) != 0x80) valid = false;
            cp = (cp << 6) | (next & 0x3F);
        }
        if (valid && ((length == 3 && (cp < 0x800 || (cp >= 0xD800 && cp <= 0xDFFF))) ||
                      (length == 4 && (cp < 0x10000 || cp > 0x10FFFF))))
            valid = false;
        if (!valid)
            throw FormulaError("byte " + hexByte(c) + " is not valid UTF-8 text", text, i);
        const std::string hint = nonAsciiHint(cp);
        const bool inName = hint.empty() && ((i > 0 && isNameChar(text[i - 1])) ||
                                             (i + length < size && isNameChar(text[i + length])));
        // Invisible or direction-changing characters are named by code only.
        const bool invisible = (cp >= 0x80 && cp <= 0xA0) || cp == 0xAD || (cp >= 0x200B && cp <= 0x200F) ||
                               (cp >= 0x2028 && cp <= 0x202F) || (cp >= 0x2060 && cp <= 0x206F) || cp == 0xFEFF ||
                               cp >= 0xFFF0;
        throw FormulaError("non-ASCII character " + (invisible ? std::string() : "'" + text.substr(i, length) + "' ") +
                               "(" + codePointText(cp) + ")" +
                               (inName ? " in a name; names use ASCII letters, digits and _" : " in the formula") + hint,
                           text, i);
    }
}

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
    std::vector<int> questions;  // positions of '?' still waiting for their ':'
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
            const int start = i;
            while (i < size && (std::isdigit(static_cast<unsigned char>(text[i])) || text[i] == '.')) ++i;
            if (i < size && (text[i] == 'e' || text[i] == 'E')) {
                int j = i + 1;
                if (j < size && (text[j] == '+' || text[j] == '-')) ++j;
                if (j < size && std::isdigit(static_cast<unsigned char>(text[j]))) {
                    i = j;
                    while (i < size && std::isdigit(static_cast<unsigned char>(text[i]))) ++i;
                } else if (j >= size || !isNameChar(text[j])) {
                    throw FormulaError("the number " + quoted(text.substr(start, j - start)) +
                                           " has an exponent without digits (write e.g. 1e5)",
                                       text, start);
                }
            }
            // The one number rule (number_text.h): overflow and underflow are out of range.
            const std::string literal = text.substr(start, i - start);
            double value = 0;
            const NumberStatus status = readDecimal(literal, value, false);
            if (status == NumberStatus::TooLarge || status == NumberStatus::TooSmall)
                throw FormulaError("the number " + outOfRangeText(literal, status), text, start);
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
            } else if (!isSymbol(name) && findFunction(name)) {
                throw FormulaError(quoted(name) + " is a function: write " + name + "(...)", text, start);
            } else if (!isSymbol(name) && name != "pi" && name != "e") {
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
        case '?': questions.push_back(i); break;
        case ':':
            if (!questions.empty()) questions.pop_back();
            break;
        case '!':
            if (i + 1 >= size || text[i + 1] != '=')
                throw FormulaError("'!' only appears in '!=' (for 'not x' write x == 0)", text, i);
            break;
        case '&':
        case '|': {
            const char pair[3] = {ch, ch, 0};
            if (i + 1 >= size || text[i + 1] != ch)
                throw FormulaError(quoted(std::string(1, ch)) + " alone has no meaning; write " + quoted(pair) +
                                       (ch == '&' ? " for 'and'" : " for 'or'"),
                                   text, i);
            ++i;  // the pair is one operator
            break;
        }
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
        std::string reason = (unknown.size() == 1 ? "unknown name " : "unknown names ") + cappedList(unknown, true);
        reason += symbols.empty() ? " (no variables are declared)" : "; the variables are " + cappedList(symbols, false);
        throw FormulaError(reason, text, firstUnknown);
    }
    // An operator at the very end has nothing to work on (muParser calls "x--" an internal error).
    int last = size - 1;
    while (last >= 0 && std::isspace(static_cast<unsigned char>(text[last]))) --last;
    if (last >= 0 && std::strchr("+-*/^<>=!&|?:,", text[last]))
        throw FormulaError("the formula ends after " + quoted(std::string(1, text[last])) + "; something must follow it",
                           text, last);
    if (!questions.empty()) throw FormulaError("'?' needs a ':' part (c ? a : b)", text, questions.back());
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
    // Text in quotes (strings) is no part of our formulas; the character check refuses quotes
    // first, so these are guards. muParser's own sentences never reach the user.
    case mu::ecUNEXPECTED_STR:
    case mu::ecSTRING_EXPECTED:
    case mu::ecVAL_EXPECTED:
    case mu::ecOPRT_TYPE_CONFLICT:
    case mu::ecSTR_RESULT:
    case mu::ecUNTERMINATED_STRING: return "text in quotes has no meaning in a formula";
    case mu::ecINTERNAL_ERROR: return "cannot read the formula here (is an operator missing its operand?)";
    default: return "cannot read the formula here";
    }
}

// muParser places some errors after the offending token (an unexpected sign in "(--x)" is
// reported at the 'x'); move the position back onto the token when the text says so.
int positionOfError(const mu::ParserError& e, const std::string& text) {
    const int size = static_cast<int>(text.size());
    // muParser may place an error one past the end (e.g. "1+"); the caret then sits after the text.
    int position = e.GetPos() < 0 ? -1 : std::min(e.GetPos(), size);
    if (e.GetCode() == mu::ecUNEXPECTED_EOF) return size;
    const std::string token = e.GetToken();
    if (e.GetCode() == mu::ecUNEXPECTED_OPERATOR && position >= 0 && !token.empty() &&
        text.compare(position, token.size(), token) != 0) {
        const int before = position - static_cast<int>(token.size());
        if (before >= 0 && text.compare(before, token.size(), token) == 0) position = before;
    }
    if (e.GetCode() == mu::ecINTERNAL_ERROR && position >= size) position = size > 0 ? size - 1 : -1;
    return position;
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
    if (text.size() > kMaxFormulaLength) {
        const auto characters = std::count_if(text.begin(), text.end(),
                                              [](char c) { return (static_cast<unsigned char>(c) & 0xC0) != 0x80; });
        if (static_cast<std::size_t>(characters) <= kMaxFormulaLength) checkCharacters(text);  // names the non-ASCII
        throw FormulaError("the formula has " + std::to_string(characters) + " characters; the limit is " +
                               std::to_string(kMaxFormulaLength),
                           "", -1);
    }
    if (std::all_of(text.begin(), text.end(), [](char c) { return std::isspace(static_cast<unsigned char>(c)); }))
        throw FormulaError("the formula is empty", text, -1);
    checkSymbolNames(symbols);
    checkCharacters(text);
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
        const int position = positionOfError(e, text);
        std::string reason = describeParserError(e);
        // Two signs in a row ("--x"): muParser takes only one.
        if (e.GetCode() == mu::ecUNEXPECTED_OPERATOR && (e.GetToken() == "-" || e.GetToken() == "+") && position > 0) {
            int previous = position - 1;
            while (previous >= 0 && std::isspace(static_cast<unsigned char>(text[previous]))) --previous;
            if (previous >= 0 && (text[previous] == '-' || text[previous] == '+'))
                reason += " (two signs in a row: write -(-x) or just x)";
        }
        throw FormulaError(reason, text, position);
    }
    if (!strayNames.empty()) {
        auto pos = text.find(strayNames.front());
        throw FormulaError("unknown name " + quoted(strayNames.front()) + "; the variables are " + joinNames(symbols), text,
                           pos == std::string::npos ? -1 : static_cast<int>(pos));
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
