// Fuzz harness: the CSV table reader (core/objective/table.h). The first byte chooses the
// options (separator, dropping incomplete rows), the rest is the file's text.
// Beyond "no crash": a refusal must be a TableError with a line inside the text; a table that
// is read must be well formed (as many values per column as rows, finite numbers, a source
// line per row); and writing it back (writeTable) must read back to the same table.
#include "core/objective/table.h"
#include "tests/fuzz/fuzz_check.h"

#include <algorithm>
#include <cstdint>
#include <string>

using sw::fuzz::finding;
using sw::fuzz::printable;
using sw::fuzz::sameBits;
using sw::fuzz::show;

extern "C" int LLVMFuzzerInitialize(int*, char***) { return 0; }

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    if (size == 0) return 0;
    sw::TableReadOptions options;
    const std::uint8_t choice = data[0];
    const sw::Separator separators[] = {sw::Separator::Auto, sw::Separator::Comma, sw::Separator::Semicolon,
                                        sw::Separator::Tab};
    options.separator = separators[choice & 3];
    options.dropIncompleteRows = (choice & 4) != 0;
    const std::string text(reinterpret_cast<const char*>(data + 1), size - 1);
    const long lines = static_cast<long>(std::count(text.begin(), text.end(), '\n')) + 1;

    sw::Table table;
    try {
        table = sw::parseTable(text, options, "fuzz.csv");
    } catch (const sw::TableError& e) {
        if (e.line() < 0 || e.line() > lines)
            finding("TableError on line " + std::to_string(e.line()) + " of " + std::to_string(lines) + ": " + e.what() +
                    " for " + printable(text));
        if (std::string(e.what()).empty()) finding("TableError without a message for " + printable(text));
        return 0;
    } catch (const std::exception& e) {
        finding(std::string("parseTable threw something other than TableError: ") + e.what() + " for " +
                printable(text));
    }

    const std::size_t rows = table.rowCount();
    if (table.columns.size() != table.columnNames.size() || table.columnNames.empty())
        finding("table with " + std::to_string(table.columnNames.size()) + " names and " +
                std::to_string(table.columns.size()) + " columns from " + printable(text));
    for (const auto& column : table.columns) {
        if (column.size() != rows) finding("ragged table read from " + printable(text));
        for (double v : column)
            if (!std::isfinite(v)) finding("non-finite value " + show(v) + " read from " + printable(text));
    }
    if (table.rowLines.size() != rows) finding("rowLines does not match the rows for " + printable(text));
    for (long line : table.rowLines)
        if (line < 1 || line > lines) finding("row line " + std::to_string(line) + " outside the text " + printable(text));

    // Round trip through the writer (which always writes commas).
    const std::string written = sw::writeTable(table);
    sw::Table back;
    try {
        back = sw::parseTable(written, {}, "written.csv");
    } catch (const sw::TableError& e) {
        finding(std::string("written table does not read back: ") + e.what() + "; written " + printable(written) +
                " from " + printable(text));
    }
    if (back.columnNames != table.columnNames)
        finding("column names change in a round trip: written " + printable(written) + " from " + printable(text));
    if (back.rowCount() != rows) finding("row count changes in a round trip: " + printable(written));
    for (std::size_t c = 0; c < table.columns.size(); ++c)
        for (std::size_t r = 0; r < rows; ++r)
            if (!sameBits(back.columns[c][r], table.columns[c][r]))
                finding("value " + show(table.columns[c][r]) + " reads back as " + show(back.columns[c][r]) +
                        " from " + printable(written));
    return 0;
}
