// The bad-input catalogue: hostile inputs to the built executable, one row each. Every row
// asserts exit code 2, that stderr names the place (formula column and caret, CSV line and
// column, study field path, option with its allowed values), that no "internal error"
// reaches the user, and that nothing was written (no output on stdout, no new file in the
// working directory). Huge inputs are generated at run time in a temporary folder.
//
// Rows are grouped: formulas, point and range values, method options and stopping rules,
// CSV tables, study files. Issue 17's cases and issue 14's catalogue are all here.
#include <gtest/gtest.h>

#include <fcntl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <functional>
#include <iterator>
#include <set>
#include <sstream>
#include <string>
#include <vector>

namespace {

namespace fs = std::filesystem;

struct Outcome {
    int exitCode = -1;
    int signal = 0;
    std::string out, err;
};

std::string slurp(const fs::path& path) {
    std::ifstream in(path, std::ios::binary);
    return std::string(std::istreambuf_iterator<char>(in), {});
}

void spit(const fs::path& path, const std::string& text) {
    std::ofstream out(path, std::ios::binary);
    out << text;
}

// Runs the executable with argv in `work` (its working directory), stdin from a pipe fed with
// `input` (at most a pipe buffer, written before the child reads) or /dev/null, stdout and
// stderr into files outside `work`. A run longer than 20 s is killed (SIGALRM survives exec),
// so a hang is a failure, not a stuck test.
Outcome runIn(const fs::path& work, const fs::path& io, const std::vector<std::string>& args, const std::string& input) {
    const fs::path outPath = io / "stdout", errPath = io / "stderr";
    int pipeEnds[2] = {-1, -1};
    if (!input.empty() && ::pipe(pipeEnds) != 0) return {};
    if (!input.empty() && ::write(pipeEnds[1], input.data(), input.size()) != static_cast<ssize_t>(input.size())) return {};
    if (!input.empty()) ::close(pipeEnds[1]);
    const pid_t child = ::fork();
    if (child == 0) {
        if (::chdir(work.c_str()) != 0) ::_exit(120);
        const int in = input.empty() ? ::open("/dev/null", O_RDONLY) : pipeEnds[0];
        const int out = ::open(outPath.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
        const int err = ::open(errPath.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
        if (in < 0 || out < 0 || err < 0) ::_exit(121);
        ::dup2(in, 0);
        ::dup2(out, 1);
        ::dup2(err, 2);
        std::vector<char*> argv;
        std::string exe = SW_EXECUTABLE;
        argv.push_back(exe.data());
        std::vector<std::string> copies = args;
        for (std::string& a : copies) argv.push_back(a.data());
        argv.push_back(nullptr);
        ::alarm(20);
        ::execv(exe.c_str(), argv.data());
        ::_exit(122);
    }
    if (!input.empty()) ::close(pipeEnds[0]);
    int status = 0;
    ::waitpid(child, &status, 0);
    Outcome o;
    if (WIFEXITED(status)) o.exitCode = WEXITSTATUS(status);
    if (WIFSIGNALED(status)) o.signal = WTERMSIG(status);
    o.out = slurp(outPath);
    o.err = slurp(errPath);
    return o;
}

struct Row {
    std::string name;
    // Writes the row's input files into the folder and returns the arguments ({dir} is not
    // needed: the folder is the working directory, so relative names work).
    std::function<std::vector<std::string>(const fs::path& dir)> setup;
    std::vector<std::string> expect;  // every piece must appear in stderr
    std::string stdinText;            // fed through a pipe as stdin ("" = /dev/null)
};

std::vector<std::string> args(std::initializer_list<std::string> list) { return list; }

std::string repeat(const std::string& piece, std::size_t times) {
    std::string s;
    s.reserve(piece.size() * times);
    for (std::size_t i = 0; i < times; ++i) s += piece;
    return s;
}

// A valid formula study around `objective` (a JSON object text) with extra top-level keys.
std::string study(const std::string& objective, const std::string& extra = "",
                  const std::string& methods = R"([{"method": "bfgs", "colour": "#002ddd"}])",
                  const std::string& variables =
                      R"([{"name": "x", "start": 1, "lower": -2, "upper": 2}, {"name": "y", "start": 1, "lower": -2, "upper": 2}])") {
    return R"({"format": "saddlewise-study", "version": 1, "objective": )" + objective + R"(, "variables": )" +
           variables + R"(, "methods": )" + methods + extra + "}";
}
std::string formulaStudy(const std::string& formulaJson, const std::string& extra = "") {
    return study(R"({"formula": )" + formulaJson + "}", extra);
}

// Derive with one formula at x=1, y=2.
Row formula(std::string name, std::string text, std::vector<std::string> expect) {
    return {std::move(name), [text](const fs::path&) { return args({"derive", text, "--at", "x=1,y=2"}); },
            std::move(expect)};
}

// A CSV table (written as given) fitted with y ~ a + b*x.
Row table(std::string name, std::string csv, std::vector<std::string> expect, std::vector<std::string> extra = {}) {
    return {std::move(name),
            [csv, extra](const fs::path& dir) {
                spit(dir / "t.csv", csv);
                std::vector<std::string> a = {"fit", "--data", "t.csv", "--model", "a + b*x", "--response", "y", "--start", "a=0,b=0"};
                a.insert(a.end(), extra.begin(), extra.end());
                return a;
            },
            std::move(expect)};
}

// A study file written as given, then run.
Row studyRow(std::string name, std::string text, std::vector<std::string> expect) {
    return {std::move(name),
            [text](const fs::path& dir) {
                spit(dir / "s.json", text);
                return args({"run", "s.json"});
            },
            std::move(expect)};
}

std::string nested(std::size_t depth) { return std::string(depth, '[') + std::string(depth, ']'); }

std::vector<Row> catalogue() {
    std::vector<Row> rows;
    // ---- formulas (issue 17: every misleading message; issue 14: huge, NUL, invalid UTF-8) ----
    rows.push_back(formula("non-ASCII name", "t\xCE\xB1 + x", {"non-ASCII character '\xCE\xB1' (U+03B1) in a name", "(at column 2)", "^"}));
    rows.push_back(formula("function used as a name", "sin + x", {"'sin' is a function: write sin(...)", "(at column 1)"}));
    rows.push_back(formula("two signs in a row", "(--x)", {"unexpected operator '-'", "two signs in a row", "(at column 3)", "\n    ^"}));
    rows.push_back(formula("operator at the end", "x--", {"the formula ends after '-'", "(at column 3)"}));
    rows.push_back(formula("a quote", "x + \"a\"", {"quotes have no meaning in a formula", "(at column 5)"}));
    rows.push_back(formula("a single quote", "x + 'a'", {"quotes have no meaning in a formula", "(at column 5)"}));
    rows.push_back(formula("conditional without else", "x>0 ? 1", {"'?' needs a ':' part", "(at column 5)", "\n      ^"}));
    rows.push_back(formula("column counts characters", "x + \xC3\xBC", {"non-ASCII character '\xC3\xBC' (U+00FC)", "(at column 5)"}));
    {
        std::string many = "x";
        for (int i = 0; i < 1500; ++i) many += "+a" + std::to_string(i);
        rows.push_back({"1500 unknown names are capped",
                        [many](const fs::path&) { return args({"derive", many, "--at", "x=1"}); },
                        {"unknown names 'a0', 'a1'", "and 1490 more", "(at column 3)"}});
    }
    rows.push_back(formula("control byte BEL", "x\a+1", {"control character BEL (U+0007)", "(at column 2)"}));
    rows.push_back(formula("escape byte", "x+\x1b[31my", {"control character ESC (U+001B)", "(at column 3)"}));
    rows.push_back(formula("DEL byte", "x\x7f", {"control character DEL (U+007F)", "(at column 2)"}));
    rows.push_back(formula("invalid UTF-8", "x+\xff", {"byte 0xFF is not valid UTF-8 text", "(at column 3)"}));
    rows.push_back(formula("truncated UTF-8", "x+\xce", {"byte 0xCE is not valid UTF-8 text", "(at column 3)"}));
    rows.push_back(formula("overflowing literal", "x*1e400", {"the number 1e400 is out of range", "(at column 3)"}));
    rows.push_back(formula("underflowing literal", "x + 1e-400", {"the number 1e-400 is out of range", "(at column 5)"}));
    rows.push_back(formula("exponent without digits", "2*1e+", {"the number '1e+' has an exponent without digits", "(at column 3)"}));
    rows.push_back(formula("minus sign from a document", "x\xE2\x88\x92" "1", {"(U+2212)", "write the ASCII '-'", "(at column 2)"}));
    rows.push_back(formula("superscript two", "x\xC2\xB2", {"(U+00B2)", "write ^2", "(at column 2)"}));
    rows.push_back(formula("zero-width space is named, not shown", "x\xE2\x80\x8B+1", {"non-ASCII character (U+200B)", "(at column 2)"}));
    rows.push_back(formula("assignment", "x = 5", {"'=' would assign a value; write '=='", "(at column 3)"}));
    rows.push_back(formula("decimal comma", "1,5*x", {"a comma only separates function arguments", "(at column 2)"}));
    rows.push_back(formula("unknown function", "x + foo(y)", {"unknown function 'foo'", "(at column 5)"}));
    rows.push_back(formula("variable called", "2*x(3)", {"'x' is a variable, not a function", "(at column 3)"}));
    rows.push_back(formula("wrong argument count", "sin(x, y)", {"sin takes 1 argument, got 2", "(at column 1)"}));
    rows.push_back(formula("unclosed parenthesis", "2*(x+1", {"this parenthesis is never closed", "(at column 3)"}));
    rows.push_back(formula("stray closing parenthesis", "x+1)", {"this closing parenthesis has no opening one", "(at column 4)"}));
    rows.push_back(formula("empty parentheses", "x*()", {"empty parentheses", "(at column 3)"}));
    rows.push_back(formula("missing operator", "3 4", {"unexpected number '4'", "(at column 3)"}));
    rows.push_back(formula("double star", "x ** 2", {"unexpected operator '*'", "(at column 4)"}));
    rows.push_back(formula("single ampersand", "x & y", {"'&' alone has no meaning; write '&&'", "(at column 3)"}));
    rows.push_back(formula("exclamation mark", "!x", {"'!' only appears in '!='", "(at column 1)"}));
    rows.push_back(formula("brackets", "x[1]", {"'[' has no meaning in a formula; group with ( and )", "(at column 2)"}));
    rows.push_back(formula("semicolon", "x; y", {"';' has no meaning in a formula", "(at column 2)"}));
    rows.push_back(formula("empty formula", "", {"the formula is empty"}));
    rows.push_back(formula("unknown name", "x + z", {"unknown name 'z'; the variables are x, y", "(at column 5)"}));
    rows.push_back(formula("nesting over the limit", std::string(201, '(') + "x" + std::string(201, ')'),
                           {"parentheses are nested more than 200 deep", "(at column 201)"}));
    rows.push_back({"100 kB formula on the command line",
                    [](const fs::path&) { return args({"derive", "x" + repeat("+x", 50000), "--at", "x=1"}); },
                    {"the formula has 100001 characters; the limit is 10000"}});
    rows.push_back({"60000-deep nesting on the command line",
                    [](const fs::path&) {
                        return args({"derive", std::string(60000, '(') + "x" + std::string(60000, ')'), "--at", "x=1"});
                    },
                    {"the formula has 120001 characters; the limit is 10000"}});
    rows.push_back(studyRow("10 MB formula in a study", formulaStudy("\"" + repeat("x+", 5 * 1024 * 1024) + "y\""),
                            {"objective.formula", "the formula has 10485761 characters; the limit is 10000"}));
    rows.push_back(studyRow("10^6 parentheses in a study formula", formulaStudy("\"" + std::string(1000000, '(') + "\""),
                            {"objective.formula", "the limit is 10000"}));
    rows.push_back(studyRow("NUL in a study formula", formulaStudy(R"("x\u0000+y")"),
                            {"objective.formula", "control character NUL (U+0000)", "(at column 2)", "\xE2\x90\x80"}));
    rows.push_back({"minimize with a bad formula",
                    [](const fs::path&) { return args({"minimize", "x^2 + y**2", "--from", "x=1,y=1", "--method", "bfgs"}); },
                    {"unexpected operator '*'", "(at column 9)"}});
    rows.push_back({"sample with a bad formula",
                    [](const fs::path&) { return args({"sample", "x + 1e999*y", "--box", "x=-1:1,y=-1:1", "--grid", "3"}); },
                    {"the number 1e999 is out of range", "(at column 5)"}});

    // ---- point and range values, grids ----
    auto derive = [](std::string at) {
        return [at](const fs::path&) { return args({"derive", "x+y", "--at", at}); };
    };
    rows.push_back({"--at overflow", derive("x=1e400,y=1"), {"--at x", "1e400 is out of range", "largest number"}});
    rows.push_back({"--at underflow", derive("x=1e-400,y=1"), {"--at x", "1e-400 is out of range", "write 0 for zero"}});
    rows.push_back({"--at nan", derive("x=nan,y=1"), {"--at x", "'nan' is not a number"}});
    rows.push_back({"--at inf", derive("x=1,y=-inf"), {"--at y", "'-inf' is not a number"}});
    rows.push_back({"--at hex", derive("x=0x10,y=1"), {"--at x", "'0x10' is not a number"}});
    rows.push_back({"--at decimal comma", derive("x=1,5,y=1"), {"--at item 2 '5' is not of the form name=value"}});
    rows.push_back({"--at duplicate name", derive("x=1,x=2"), {"--at: 'x' is given twice"}});
    rows.push_back({"--at bad name", derive("2x=1,y=1"), {"--at item 1: '2x' is not a valid name"}});
    rows.push_back({"--at empty value", derive("x=,y=1"), {"--at x", "is not a number"}});
    rows.push_back({"--at control byte in a name", derive("x\x01=1,y=1"), {"--at item 1: 'x\\x01' is not a valid name"}});
    rows.push_back({"--from overflow",
                    [](const fs::path&) { return args({"minimize", "x^2+y^2", "--from", "x=1,y=-2e308", "--method", "bfgs"}); },
                    {"--from y", "-2e308 is out of range"}});
    auto sample = [](std::string box, std::string grid) {
        return [box, grid](const fs::path&) { return args({"sample", "x+y", "--box", box, "--grid", grid}); };
    };
    rows.push_back({"--box reversed range", sample("x=5:1,y=-1:1", "3"), {"--box x: the low end must be below the high end (got 5:1)"}});
    rows.push_back({"--box empty range", sample("x=1:1,y=-1:1", "3"), {"--box x: the low end must be below the high end"}});
    rows.push_back({"--box overflow", sample("x=-1:1e400,y=-1:1", "3"), {"--box x high end", "1e400 is out of range"}});
    rows.push_back({"--box not a range", sample("x=-1..1,y=-1:1", "3"), {"--box item 1 'x=-1..1' is not of the form name=low:high"}});
    rows.push_back({"--grid zero", sample("x=-1:1,y=-1:1", "0"), {"--grid", "out of range"}});
    rows.push_back({"--grid text", sample("x=-1:1,y=-1:1", "ten"), {"--grid", "'ten' is not a whole number"}});
    rows.push_back({"--grid too large for a long", sample("x=-1:1,y=-1:1", "99999999999999999999"), {"--grid", "is out of range"}});

    // ---- methods, options and stopping rules ----
    auto minimize = [](std::vector<std::string> extra) {
        return [extra](const fs::path&) {
            std::vector<std::string> a = {"minimize", "x^2+y^2", "--from", "x=1,y=1"};
            a.insert(a.end(), extra.begin(), extra.end());
            return a;
        };
    };
    rows.push_back({"unknown method", minimize({"--method", "bfgss"}), {"unknown method 'bfgss'; known:", "trust-region-exact"}});
    rows.push_back({"option out of range", minimize({"--method", "trust-region-exact", "--option", "initial_radius=-1"}),
                    {"initial_radius", "must be > 0"}});
    rows.push_back({"option not a choice", minimize({"--method", "gradient-descent", "--option", "line_search=best"}),
                    {"line_search", "one of: fixed, armijo, wolfe"}});
    rows.push_back({"option nobody has", minimize({"--method", "bfgs", "--option", "nosuch=1"}),
                    {"--option nosuch: no chosen method has this option", "bfgs:"}});
    rows.push_back({"option overflowing", minimize({"--method", "trust-region-exact", "--option", "max_radius=1e400"}),
                    {"max_radius"}});
    rows.push_back({"option nan", minimize({"--method", "trust-region-exact", "--option", "eta=nan"}), {"eta"}});
    rows.push_back({"option for a method not chosen", minimize({"--method", "bfgs", "--option", "newton.x=1"}),
                    {"--option newton.x: method 'newton' is not among the --method choices"}});
    rows.push_back({"least squares method on a formula", minimize({"--method", "levenberg-marquardt"}),
                    {"levenberg-marquardt needs a least-squares objective"}});
    rows.push_back({"negative iteration limit", minimize({"--method", "bfgs", "--max-iterations", "-1"}),
                    {"--max-iterations", "out of range (0 to 100000000)"}});
    rows.push_back({"iteration limit above the bound", minimize({"--method", "bfgs", "--max-iterations", "100000001"}),
                    {"--max-iterations", "out of range (0 to 100000000)"}});
    rows.push_back({"negative gradient tolerance", minimize({"--method", "bfgs", "--gradient-tolerance", "-1"}),
                    {"--gradient-tolerance must be >= 0"}});
    rows.push_back({"overflowing gradient tolerance", minimize({"--method", "bfgs", "--gradient-tolerance", "1e999"}),
                    {"--gradient-tolerance", "1e999 is out of range"}});
    rows.push_back({"unknown option flag", minimize({"--method", "bfgs", "--fast"}), {"unknown option --fast; this verb takes:"}});

    // ---- CSV tables ----
    rows.push_back(table("empty table", "", {"t.csv", "the table is empty"}));
    rows.push_back(table("header only", "x,y\n", {"t.csv: line 1", "the table has a header row but no data rows"}));
    rows.push_back(table("comments only", "# nothing\n\n# here\n", {"t.csv", "the table is empty"}));
    rows.push_back(table("nan cell", "x,y\n1,2\n2,nan\n", {"t.csv: line 3, column 2", "'nan' is not a number"}));
    rows.push_back(table("inf cell", "x,y\n1,2\ninf,3\n", {"t.csv: line 3, column 1", "'inf' is not a number"}));
    rows.push_back(table("overflowing cell", "x,y\n1,2\n2,1e400\n", {"t.csv: line 3, column 2", "1e400 is out of range"}));
    rows.push_back(table("underflowing cell", "x,y\n1,2\n2,-1e-400\n", {"t.csv: line 3, column 2", "-1e-400 is out of range"}));
    rows.push_back(table("duplicate column names", "x,y,x\n1,2,3\n", {"t.csv: line 1, column 3", "column name 'x' repeats column 1"}));
    rows.push_back(table("control bytes in a column name", "x,\x1b[2Jy\n1,2\n",
                         {"t.csv: line 1, column 2", "holds a control character (code 27)", "\\x1B"}));
    rows.push_back(table("200,000-column header", [] {
                             std::string csv;
                             for (int c = 0; c < 200000; ++c) csv += (c ? ",c" : "c") + std::to_string(c);
                             csv += "\n";
                             for (int c = 0; c < 200000; ++c) csv += c ? ",1" : "1";
                             return csv + "\n";
                         }(),
                         {"t.csv: line 1, column 10001", "200000 columns; a table may have at most 10000"}));
    rows.push_back(table("NUL byte", std::string("x,y\n1,2\n3,\0" "4\n", 13), {"t.csv: line 3", "a NUL byte at character 3"}));
    rows.push_back(table("invalid UTF-8 header", "x,\xff\xfe\xfd\n1,2\n", {"t.csv: line 1, column 2", "is not UTF-8 text"}));
    rows.push_back(table("invalid UTF-8 cell", "x,y\n1,\xff\n", {"t.csv: line 2, column 2", "'\\xFF' is not a number"}));
    rows.push_back(table("BOM and CRLF with a bad cell", "\xEF\xBB\xBFx,y\r\n1,2\r\n3,four\r\n", {"t.csv: line 3, column 2", "'four' is not a number"}));
    rows.push_back(table("CR-only line ends", "x,y\r1,2\r3,4\r", {"t.csv: line 1", "CR-only line ends"}));
    rows.push_back(table("UTF-16", std::string("\xFF\xFEx\0,\0y\0", 8), {"t.csv: line 1", "UTF-16"}));
    rows.push_back(table("ragged row", "x,y\n1,2\n3,4,5\n", {"t.csv: line 3, column 3", "3 cells, but the header"}));
    rows.push_back(table("short row", "x,y\n1,2\n3\n", {"t.csv: line 3, column 2", "column 'y' is missing"}));
    rows.push_back(table("empty cell", "x,y\n1,2\n,4\n", {"t.csv: line 3, column 1", "empty cell"}));
    rows.push_back(table("decimal comma in a cell", "x;y\n1;2,5\n", {"t.csv: line 2, column 2", "(use '.' as the decimal point)"}));
    rows.push_back(table("unclosed quote", "x,y\n1,\"2\n", {"t.csv: line 2, column 2", "never closed"}));
    rows.push_back({"function used as a name in a model",
                    [](const fs::path& dir) {
                        spit(dir / "t.csv", "x,y\n1,2\n2,3\n");
                        return std::vector<std::string>{"fit", "--data", "t.csv", "--model", "sin + a*x",
                                                        "--response", "y", "--start", "a=1"};
                    },
                    {"'sin' is a function: write sin(...)", "^"}});
    rows.push_back(table("model names a missing column", "x,z\n1,2\n2,3\n", {"y"}));
    rows.push_back({"10^6-row table with a bad last row",
                    [](const fs::path& dir) {
                        std::string csv = "x,y\n";
                        csv.reserve(9 * 1000000);
                        for (int i = 0; i < 999999; ++i) csv += "1,2.5\n";
                        csv += "1,2.5.\n";
                        spit(dir / "big.csv", csv);
                        return args({"fit", "--data", "big.csv", "--model", "a+b*x", "--response", "y", "--start", "a=0,b=0"});
                    },
                    {"big.csv: line 1000001, column 2", "'2.5.' is not a number"}});
    rows.push_back({"data is a directory (was internal error: std::bad_alloc)",
                    [](const fs::path& dir) {
                        fs::create_directory(dir / "folder");
                        return args({"fit", "--data", "folder", "--model", "a+b*x", "--response", "y", "--start", "a=0,b=0"});
                    },
                    {"folder", "is a directory"}});
    rows.push_back({"data file missing",
                    [](const fs::path&) {
                        return args({"fit", "--data", "none.csv", "--model", "a+b*x", "--response", "y", "--start", "a=0"});
                    },
                    {"none.csv", "does not exist"}});
    rows.push_back({"data is /dev/zero",
                    [](const fs::path&) {
                        return args({"fit", "--data", "/dev/zero", "--model", "a+b*x", "--response", "y", "--start", "a=0,b=0"});
                    },
                    {"/dev/zero: line 1", "a NUL byte"}});
    rows.push_back({"data from a pipe with a bad cell",
                    [](const fs::path&) {
                        return args({"fit", "--data", "/dev/stdin", "--model", "a+b*x", "--response", "y", "--start", "a=0,b=0"});
                    },
                    {"/dev/stdin: line 3, column 2", "'oops' is not a number"},
                    "x,y\n1,2\n2,oops\n"});

    // ---- study files ----
    const std::string good = formulaStudy(R"("x^2+y^2")");
    rows.push_back(studyRow("empty study", "", {"s.json", "not valid JSON"}));
    rows.push_back({"study is a directory",
                    [](const fs::path& dir) {
                        fs::create_directory(dir / "study.json");
                        return args({"run", "study.json"});
                    },
                    {"file: 'study.json' is a directory"}});
    rows.push_back({"study is /dev/zero", [](const fs::path&) { return args({"run", "/dev/zero"}); }, {"line 1, column 1", "a NUL byte"}});
    rows.push_back(studyRow("huge version number", R"({"format": "saddlewise-study", "version": 18446744073709551615})",
                            {"version: this file is format version 18446744073709551615; this Saddlewise reads up to 1"}));
    rows.push_back(studyRow("version 1e30", R"({"format": "saddlewise-study", "version": 1e30})",
                            {"version: this file is format version 1e+30"}));
    rows.push_back(studyRow("version zero", R"({"format": "saddlewise-study", "version": 0})", {"version: must be 1 or more (got 0)"}));
    rows.push_back(studyRow("1e999 in a study", formulaStudy(R"("x^2+y^2")", R"(, "stopping": {"gradient_tolerance": 1e999})"),
                            {"stopping.gradient_tolerance: 1e999 is out of range"}));
    rows.push_back(studyRow("1e-400 in a study", study(R"({"formula": "x^2+y^2"})", "", R"([{"method": "bfgs", "colour": "#002ddd"}])",
                                                       R"([{"name": "x", "start": 1e-400, "lower": -2, "upper": 2}, {"name": "y", "start": 1, "lower": -2, "upper": 2}])"),
                            {"variables[0].start: 1e-400 is out of range"}));
    rows.push_back(studyRow("1e999 in a method option",
                            study(R"({"formula": "x^2+y^2"})", "",
                                  R"([{"method": "trust-region-exact", "colour": "#002ddd", "options": {"initial_radius": -1e999}}])"),
                            {"methods[0].options.initial_radius: -1e999 is out of range"}));
    rows.push_back(studyRow("negative gradient tolerance (1e308 is accepted: study_json_test)",
                            formulaStudy(R"("x^2+y^2")", R"(, "stopping": {"gradient_tolerance": -1})"),
                            {"stopping.gradient_tolerance: must be >= 0 (got -1)"}));
    rows.push_back(studyRow("document nested 10^6 deep", nested(1000000), {"document", "nested more than 32 levels deep"}));
    rows.push_back(studyRow("title nested 10^5 deep",
                            R"({"format": "saddlewise-study", "version": 1, "title": )" + nested(100000) + "}",
                            {"title[0]", "nested more than 32 levels deep", "line 1, column"}));
    rows.push_back(studyRow("formula nested 10^5 deep", study(R"({"formula": )" + nested(100000) + "}"),
                            {"objective.formula", "nested more than 32 levels deep"}));
    rows.push_back(studyRow("notes nested 10^6 deep",
                            R"({"format": "saddlewise-study", "version": 1, "notes": {"a": )" + nested(1000000) + "}}",
                            {"notes.a", "nested more than 32 levels deep"}));
    rows.push_back({"data path is /dev/zero",
                    [](const fs::path& dir) {
                        spit(dir / "s.json",
                             study(R"({"data": "/dev/zero", "checksum": "sha256:)" + std::string(64, '0') +
                                   R"(", "model": "a*x", "response": "y"})",
                                   "", R"([{"method": "bfgs", "colour": "#002ddd"}])",
                                   R"([{"name": "a", "start": 1, "lower": -2, "upper": 2}, {"name": "b", "start": 1, "lower": -2, "upper": 2}])"));
                        return args({"run", "s.json"});
                    },
                    {"objective.data: '/dev/zero' is not a regular file"}});
    rows.push_back({"data path is a directory",
                    [](const fs::path& dir) {
                        fs::create_directory(dir / "data");
                        spit(dir / "s.json",
                             study(R"({"data": "data", "checksum": "sha256:)" + std::string(64, '0') +
                                   R"(", "model": "a*x", "response": "y"})",
                                   "", R"([{"method": "bfgs", "colour": "#002ddd"}])",
                                   R"([{"name": "a", "start": 1, "lower": -2, "upper": 2}, {"name": "b", "start": 1, "lower": -2, "upper": 2}])"));
                        return args({"run", "s.json"});
                    },
                    {"objective.data: 'data' is a directory"}});
    rows.push_back({"50 MB study with 300,000 method entries",
                    [](const fs::path& dir) {
                        std::string methods = "[";
                        for (int i = 0; i < 300000; ++i)
                            methods += std::string(i ? "," : "") + R"({"label": "run number )" + std::to_string(i) +
                                       R"( of a very long lineup", "method": "bfgs", "colour": "#002ddd", "marker": "circle"})";
                        methods += "]";
                        spit(dir / "s.json", study(R"({"formula": "x^2+y^2"})", "", methods));
                        return args({"run", "s.json"});
                    },
                    {"file: 's.json' is ", "bytes; the limit is 16 MiB"}});
    {
        std::string methods = "[";
        for (int i = 0; i < 1001; ++i)
            methods += std::string(i ? "," : "") + R"({"label": "m)" + std::to_string(i) + R"(", "method": "bfgs", "colour": "#002ddd"})";
        methods += "]";
        rows.push_back(studyRow("1001 method entries", study(R"({"formula": "x^2+y^2"})", "", methods),
                                {"methods: has 1001 entries; the limit is 1000"}));
    }
    rows.push_back(studyRow("duplicate key", R"({"format": "saddlewise-study", "version": 1, "title": "a", "title": "b"})",
                            {"title: this key appears twice in one object"}));
    rows.push_back(studyRow("duplicate label",
                            study(R"({"formula": "x^2+y^2"})", "",
                                  R"([{"method": "bfgs", "colour": "#002ddd"}, {"method": "bfgs", "colour": "#f87855"}])"),
                            {"methods[1].label: 'bfgs' is already used by an earlier entry"}));
    rows.push_back(studyRow("NUL byte in the study text", std::string("{\"format\": \0}", 13), {"line 1, column 12", "a NUL byte"}));
    rows.push_back(studyRow("invalid UTF-8 in a string", "{\"format\": \"saddle\xffwise\"}", {"line 1, column", "not valid JSON"}));
    rows.push_back(studyRow("unknown key", formulaStudy(R"("x^2+y^2")", R"(, "stoping": {})"), {"stoping: unknown key; the keys here are"}));
    rows.push_back(studyRow("reversed variable range",
                            study(R"({"formula": "x^2+y^2"})", "", R"([{"method": "bfgs", "colour": "#002ddd"}])",
                                  R"([{"name": "x", "start": 1, "lower": 2, "upper": -2}, {"name": "y", "start": 1, "lower": -2, "upper": 2}])"),
                            {"variables[0].lower: must be below upper (got lower 2, upper -2)"}));
    rows.push_back(studyRow("duplicate variable",
                            study(R"({"formula": "x^2"})", "", R"([{"method": "bfgs", "colour": "#002ddd"}])",
                                  R"([{"name": "x", "start": 1, "lower": -2, "upper": 2}, {"name": "x", "start": 1, "lower": -2, "upper": 2}])"),
                            {"variables[1].name: 'x' is named twice"}));
    rows.push_back(studyRow("unknown method in a study", study(R"({"formula": "x^2+y^2"})", "", R"([{"method": "bfgss", "colour": "#002ddd"}])"),
                            {"methods[0].method: unknown method 'bfgss'; known:"}));
    rows.push_back(studyRow("iteration limit above the stated one", formulaStudy(R"("x^2+y^2")", R"(, "stopping": {"max_iterations": 1e7})"),
                            {"stopping.max_iterations: must be a whole number from 1 to 1000000 (got 10000000.0)"}));
    rows.push_back(studyRow("formula with a non-ASCII name in a study", formulaStudy("\"x^2+\xCE\xB2\""),
                            {"objective.formula", "non-ASCII character '\xCE\xB2' (U+03B2)", "(at column 5)"}));
    (void)good;
    return rows;
}

TEST(BadInput, EveryHostileInputIsRefusedWithItsPlaceAndNothingWritten) {
    const std::vector<Row> rows = catalogue();
    EXPECT_GE(rows.size(), 80u);
    const fs::path root = fs::temp_directory_path() / ("sw-bad-input-" + std::to_string(::getpid()));
    fs::remove_all(root);
    fs::create_directories(root);
    std::set<std::string> names;
    int index = 0;
    for (const Row& row : rows) {
        SCOPED_TRACE("row " + std::to_string(index) + ": " + row.name);
        EXPECT_TRUE(names.insert(row.name).second) << "row names are unique";
        const fs::path work = root / ("w" + std::to_string(index));
        const fs::path io = root / ("io" + std::to_string(index));
        fs::create_directories(work);
        fs::create_directories(io);
        ++index;
        const std::vector<std::string> arguments = row.setup(work);
        std::set<fs::path> before;
        for (const auto& entry : fs::recursive_directory_iterator(work)) before.insert(entry.path());
        const auto started = std::chrono::steady_clock::now();
        const Outcome o = runIn(work, io, arguments, row.stdinText);
        const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
        if (seconds > 1.0) std::printf("  slow row (%.1f s, a measure, not a check): %s\n", seconds, row.name.c_str());
        EXPECT_EQ(o.signal, 0) << "killed by signal " << o.signal << " (SIGALRM = a hang)\n" << o.err;
        EXPECT_EQ(o.exitCode, 2) << o.err;
        for (const std::string& piece : row.expect)
            EXPECT_NE(o.err.find(piece), std::string::npos) << "missing: " << piece << "\nstderr: " << o.err.substr(0, 2000);
        EXPECT_EQ(o.err.find("internal error"), std::string::npos) << o.err;
        EXPECT_LT(o.err.size(), 4000u) << "a message is a few lines, not a dump";
        EXPECT_EQ(o.out, "") << "nothing is written to stdout";
        std::set<fs::path> after;
        for (const auto& entry : fs::recursive_directory_iterator(work)) after.insert(entry.path());
        EXPECT_EQ(before, after) << "no file is written";
        fs::remove_all(work);
        fs::remove_all(io);
    }
    fs::remove_all(root);
}

// Streams are read as streams: a table from a pipe (/dev/stdin) fits like the file.
TEST(BadInput, TablesFromPipesAreRead) {
    const fs::path root = fs::temp_directory_path() / ("sw-pipe-" + std::to_string(::getpid()));
    fs::create_directories(root);
    const Outcome o = runIn(root, root,
                            args({"fit", "--data", "/dev/stdin", "--model", "a+b*x", "--response", "y", "--start",
                                  "a=0,b=0", "--summary"}),
                            "x,y\n0,1\n1,3.1\n2,4.9\n3,7.2\n");
    EXPECT_EQ(o.exitCode, 0) << o.err;
    EXPECT_NE(o.out.find("4 rows x 2 columns"), std::string::npos) << o.out;
    fs::remove_all(root);
}

}  // namespace
