#pragma once
// A numeric data table read from CSV text: a header row of column names, then rows of numbers.
//
// What is accepted (and what is reported, never guessed silently):
//   - separator: comma, semicolon or tab; detected from the header row (the most frequent of
//     the three outside quotes) or given; the choice is reported in Table::separatorName;
//   - RFC 4180 quoting: "a, b" is one field, "" inside quotes is one quote, quoted fields may
//     span lines;
//   - UTF-8 with or without a byte-order mark (a UTF-16 mark is refused with a message);
//   - lines whose first non-blank character is '#' are comments; blank lines are ignored;
//   - numbers in plain or scientific notation with '.' as the decimal point, parsed with
//     std::from_chars (never the locale); surrounding spaces are ignored.
// Errors (TableError) name the line, the column and the text found: a non-numeric or
// non-finite cell, a ragged row, an empty table, an empty or repeated column name.
// With dropIncompleteRows, rows with an empty (or "NA") cell or too few cells are skipped
// and counted in Table::droppedRows instead.

#include <cstddef>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace sw {

enum class Separator { Auto, Comma, Semicolon, Tab };
const char* toString(Separator s);  // "auto", "comma", "semicolon", "tab"
// "auto", "comma", "semicolon", "tab" (also ",", ";", "\t"); false when unknown.
bool parseSeparator(const std::string& text, Separator& separator);

// A table has at most this many columns (a model reads a handful; the limit keeps a stray
// one-row file of 10^6 cells from costing seconds before it is refused).
inline constexpr std::size_t kMaxTableColumns = 10000;

struct TableReadOptions {
    Separator separator = Separator::Auto;  // Auto: detected from the header row
    bool dropIncompleteRows = false;        // skip rows with empty/NA cells or too few cells (counted)
};

// A problem in the file. line and column are 1-based (0 when no single place is to blame).
class TableError : public std::runtime_error {
public:
    TableError(const std::string& source, long line, int column, std::string found, const std::string& reason);
    long line() const { return line_; }
    int column() const { return column_; }
    const std::string& found() const { return found_; }
    const std::string& reason() const { return reason_; }

private:
    long line_;
    int column_;
    std::string found_;
    std::string reason_;
};

struct Table {
    std::vector<std::string> columnNames;
    std::vector<std::vector<double>> columns;  // columns[c][row]
    std::vector<long> rowLines;                // source line of each kept row (for messages)
    Separator separator = Separator::Comma;    // the one used
    bool separatorDetected = false;            // true when it was detected rather than given
    bool hadByteOrderMark = false;
    long droppedRows = 0;                      // rows skipped by dropIncompleteRows
    std::string source;                        // file name or "<text>"

    std::size_t rowCount() const { return columns.empty() ? 0 : columns.front().size(); }
    int columnCount() const { return static_cast<int>(columnNames.size()); }
    // Index of a column by exact name, -1 when absent.
    int columnIndex(const std::string& name) const;
    const std::vector<double>& column(const std::string& name) const;  // throws std::out_of_range
    // "x, y, z" for messages.
    std::string columnList() const;
    // One line for people, e.g. "214 rows x 2 columns (x, y), comma-separated (detected), 1 row dropped".
    std::string summary() const;
};

// Parses CSV text. `source` names it in messages (e.g. the file path).
Table parseTable(std::string_view text, const TableReadOptions& options = {}, const std::string& source = "<text>");
// Reads a file; a missing or unreadable file is a TableError with line 0.
Table readTable(const std::string& path, const TableReadOptions& options = {});

// Writes a table as CSV (comma, header quoted where needed, numbers with 17 significant
// digits in the C locale), so that parseTable gives the same table back.
std::string writeTable(const Table& table);

}  // namespace sw
