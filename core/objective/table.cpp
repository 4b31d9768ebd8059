#include "core/objective/table.h"

#include "core/expr/number_text.h"
#include "core/objective/text_file.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <deque>
#include <fstream>
#include <sstream>
#include <unordered_map>

namespace sw {

const char* toString(Separator s) {
    switch (s) {
        case Separator::Auto: return "auto";
        case Separator::Comma: return "comma";
        case Separator::Semicolon: return "semicolon";
        case Separator::Tab: return "tab";
    }
    return "?";
}

bool parseSeparator(const std::string& text, Separator& separator) {
    if (text == "auto") separator = Separator::Auto;
    else if (text == "comma" || text == ",") separator = Separator::Comma;
    else if (text == "semicolon" || text == ";") separator = Separator::Semicolon;
    else if (text == "tab" || text == "\t") separator = Separator::Tab;
    else return false;
    return true;
}

static std::string placeText(const std::string& source, long line, int column) {
    std::string s = source;
    if (line > 0) s += ": line " + std::to_string(line);
    if (column > 0) s += ", column " + std::to_string(column);
    return s;
}

TableError::TableError(const std::string& source, long line, int column, std::string found, const std::string& reason)
    : std::runtime_error(placeText(source, line, column) + ": " + reason),
      line_(line),
      column_(column),
      found_(std::move(found)),
      reason_(reason) {}

int Table::columnIndex(const std::string& name) const {
    for (std::size_t i = 0; i < columnNames.size(); ++i)
        if (columnNames[i] == name) return static_cast<int>(i);
    return -1;
}

const std::vector<double>& Table::column(const std::string& name) const {
    int i = columnIndex(name);
    if (i < 0) throw std::out_of_range("no column named '" + name + "'; columns: " + columnList());
    return columns[static_cast<std::size_t>(i)];
}

std::string Table::columnList() const {
    std::string s;
    for (const auto& n : columnNames) s += (s.empty() ? "" : ", ") + n;
    return s;
}

std::string Table::summary() const {
    std::ostringstream out;
    out << rowCount() << (rowCount() == 1 ? " row" : " rows") << " x " << columnCount()
        << (columnCount() == 1 ? " column" : " columns") << " (" << columnList() << "), " << toString(separator)
        << "-separated (" << (separatorDetected ? "detected" : "given") << ")";
    if (hadByteOrderMark) out << ", UTF-8 byte-order mark skipped";
    if (droppedRows > 0) out << ", " << droppedRows << (droppedRows == 1 ? " incomplete row" : " incomplete rows")
                             << " dropped";
    return out.str();
}

namespace {

char separatorChar(Separator s) {
    switch (s) {
        case Separator::Semicolon: return ';';
        case Separator::Tab: return '\t';
        default: return ',';
    }
}

bool isBlank(char c) { return c == ' ' || c == '\t' || c == '\r'; }

// Length of the valid UTF-8 character at s[i], or 0 when the byte there does not start one.
std::size_t utf8Length(std::string_view s, std::size_t i) {
    const auto c = static_cast<unsigned char>(s[i]);
    if (c < 0x80) return 1;
    const std::size_t length = c >= 0xF0 && c <= 0xF4 ? 4 : c >= 0xE0 && c <= 0xEF ? 3 : c >= 0xC2 && c <= 0xDF ? 2 : 0;
    if (length == 0 || i + length > s.size()) return 0;
    for (std::size_t k = 1; k < length; ++k)
        if ((static_cast<unsigned char>(s[i + k]) & 0xC0) != 0x80) return 0;
    return length;
}

// Shortens a cell for a message; control bytes and bytes that are not UTF-8 are shown by
// code (\x00), never raw.
std::string shown(std::string_view s) {
    std::string t;
    std::size_t i = 0, characters = 0;
    while (i < s.size() && characters < 40) {
        const std::size_t length = utf8Length(s, i);
        const auto c = static_cast<unsigned char>(s[i]);
        if (length == 0 || c < 0x20 || c == 0x7F) {
            static const char* hex = "0123456789ABCDEF";
            t += "\\x";
            t += hex[c >> 4];
            t += hex[c & 15];
            ++i;
        } else {
            t.append(s.substr(i, length));
            i += length;
        }
        ++characters;
    }
    if (i < s.size()) t += "...";
    return "'" + t + "'";
}

// The first byte that is not part of valid UTF-8 text, or npos.
std::size_t firstInvalidUtf8(std::string_view s) {
    for (std::size_t i = 0; i < s.size();) {
        const std::size_t length = utf8Length(s, i);
        if (length == 0) return i;
        i += length;
    }
    return std::string_view::npos;
}

std::string_view trimmed(std::string_view s, char sep) {
    auto blank = [sep](char c) { return c == ' ' || c == '\r' || (c == '\t' && sep != '\t'); };
    std::size_t b = 0, e = s.size();
    while (b < e && blank(s[b])) ++b;
    while (e > b && blank(s[e - 1])) --e;
    return s.substr(b, e - b);
}

struct Field {
    std::string_view text;
    bool quoted = false;
};

// Reads CSV records one at a time, tracking physical line numbers.
class RecordReader {
public:
    RecordReader(std::string_view text, std::size_t start, const std::string& source)
        : text_(text), pos_(start), source_(source) {}

    // Skips blank and comment lines; false at the end of the text.
    bool nextContentLine() {
        while (pos_ < text_.size()) {
            std::size_t p = pos_;
            while (p < text_.size() && isBlank(text_[p])) ++p;
            if (p >= text_.size()) {
                pos_ = p;
                return false;
            }
            if (text_[p] == '\n' || text_[p] == '#') {
                std::size_t nl = text_.find('\n', p);
                pos_ = nl == std::string_view::npos ? text_.size() : nl + 1;
                ++line_;
                continue;
            }
            return true;
        }
        return false;
    }

    // Counts candidate separators on the current line, outside quotes.
    Separator detect() const {
        long comma = 0, semicolon = 0, tab = 0;
        bool inQuotes = false;
        for (std::size_t p = pos_; p < text_.size(); ++p) {
            char c = text_[p];
            if (c == '"') inQuotes = !inQuotes;
            else if (!inQuotes && c == '\n') break;
            else if (!inQuotes && c == ',') ++comma;
            else if (!inQuotes && c == ';') ++semicolon;
            else if (!inQuotes && c == '\t') ++tab;
        }
        if (semicolon > comma && semicolon >= tab) return Separator::Semicolon;
        if (tab > comma && tab > semicolon) return Separator::Tab;
        return Separator::Comma;
    }

    long line() const { return line_; }

    // Reads one record at the current position (a content line). Fields view into the
    // text or into this reader's scratch storage (valid until the next call).
    void read(char sep, std::vector<Field>& fields) {
        fields.clear();
        scratch_.clear();
        recordLine_ = line_;
        const std::size_t n = text_.size();
        std::size_t p = pos_;
        for (;;) {
            // leading spaces of a field
            std::size_t fieldStart = p;
            while (p < n && (text_[p] == ' ' || (text_[p] == '\t' && sep != '\t'))) ++p;
            if (p < n && text_[p] == '"') {
                const long quoteLine = line_;
                const int quoteColumn = static_cast<int>(fields.size()) + 1;
                ++p;
                std::size_t begin = p;
                bool doubled = false;
                for (;;) {
                    std::size_t q = text_.find('"', p);
                    if (q == std::string_view::npos)
                        throw TableError(source_, quoteLine, quoteColumn, "",
                                         "a quoted field is never closed (missing '\"')");
                    for (std::size_t k = p; k < q; ++k)
                        if (text_[k] == '\n') ++line_;
                    if (q + 1 < n && text_[q + 1] == '"') {
                        doubled = true;
                        p = q + 2;
                        continue;
                    }
                    p = q + 1;
                    std::string_view inside = text_.substr(begin, q - begin);
                    if (doubled) {
                        std::string& s = scratch_.emplace_back();
                        s.reserve(inside.size());
                        for (std::size_t k = 0; k < inside.size(); ++k) {
                            s += inside[k];
                            if (inside[k] == '"') ++k;
                        }
                        fields.push_back({s, true});
                    } else {
                        fields.push_back({inside, true});
                    }
                    break;
                }
                while (p < n && (text_[p] == ' ' || text_[p] == '\r' || (text_[p] == '\t' && sep != '\t'))) ++p;
                if (p < n && text_[p] != sep && text_[p] != '\n') {
                    std::size_t e = p;
                    while (e < n && text_[e] != '\n' && text_[e] != sep) ++e;
                    throw TableError(source_, line_, quoteColumn, std::string(text_.substr(p, e - p)),
                                     "text " + shown(text_.substr(p, e - p)) + " after a closing quote");
                }
            } else {
                std::size_t e = p;
                while (e < n && text_[e] != sep && text_[e] != '\n') {
                    if (text_[e] == '"') {
                        std::size_t le = e;
                        while (le < n && text_[le] != sep && text_[le] != '\n') ++le;
                        throw TableError(source_, line_, static_cast<int>(fields.size()) + 1,
                                         std::string(text_.substr(fieldStart, le - fieldStart)),
                                         "a quote inside an unquoted field " +
                                             shown(text_.substr(fieldStart, le - fieldStart)) +
                                             " (quote the whole field and double inner quotes)");
                    }
                    ++e;
                }
                fields.push_back({trimmed(text_.substr(p, e - p), sep), false});
                p = e;
            }
            if (p < n && text_[p] == sep) {
                ++p;
                continue;
            }
            if (p < n && text_[p] == '\n') {
                ++p;
                ++line_;
            }
            break;
        }
        pos_ = p;
    }

    long recordLine() const { return recordLine_; }

private:
    std::string_view text_;
    std::size_t pos_;
    const std::string& source_;
    long line_ = 1;
    long recordLine_ = 1;
    std::deque<std::string> scratch_;
};

bool looksMissing(std::string_view cell) { return cell.empty() || cell == "NA"; }

// Before reading records: bytes a text table cannot hold, and line ends it would misread.
void checkText(std::string_view text, const std::string& source) {
    if (const auto nul = text.find('\0'); nul != std::string_view::npos) {
        const TextPlace place = placeOfByte(std::string(text.substr(0, nul + 1)), nul);
        throw TableError(source, place.line, 0, "",
                         "a NUL byte at character " + std::to_string(place.column) +
                             " of the line: this is not a text table (binary data?)");
    }
    // A carriage return not followed by a line feed: classic Mac line ends (CR only), which
    // would read as one long line.
    for (std::size_t p = text.find('\r'); p != std::string_view::npos; p = text.find('\r', p + 1)) {
        if (p + 1 < text.size() && text[p + 1] == '\n') continue;
        if (p + 1 == text.size()) break;  // a CR at the very end is harmless
        const long line = 1 + static_cast<long>(std::count(text.begin(), text.begin() + static_cast<std::ptrdiff_t>(p), '\n'));
        throw TableError(source, line, 0, "",
                         "a line ends with a carriage return (CR) alone: the file has CR-only line ends (classic "
                         "Mac); save it with LF or CRLF line ends");
    }
}

}  // namespace

Table parseTable(std::string_view text, const TableReadOptions& options, const std::string& source) {
    Table table;
    table.source = source;
    std::size_t start = 0;
    if (text.size() >= 3 && static_cast<unsigned char>(text[0]) == 0xEF &&
        static_cast<unsigned char>(text[1]) == 0xBB && static_cast<unsigned char>(text[2]) == 0xBF) {
        start = 3;
        table.hadByteOrderMark = true;
    } else if (text.size() >= 2 && ((static_cast<unsigned char>(text[0]) == 0xFF &&
                                     static_cast<unsigned char>(text[1]) == 0xFE) ||
                                    (static_cast<unsigned char>(text[0]) == 0xFE &&
                                     static_cast<unsigned char>(text[1]) == 0xFF))) {
        throw TableError(source, 1, 0, "", "the file is UTF-16 encoded; save it as UTF-8 (with or without BOM)");
    }

    checkText(text, source);
    RecordReader reader(text, start, source);
    if (!reader.nextContentLine())
        throw TableError(source, 0, 0, "", "the table is empty (no header row; blank and '#' lines are ignored)");

    if (options.separator == Separator::Auto) {
        table.separator = reader.detect();
        table.separatorDetected = true;
    } else {
        table.separator = options.separator;
    }
    const char sep = separatorChar(table.separator);

    std::vector<Field> fields;
    fields.reserve(16);
    reader.read(sep, fields);
    const long headerLine = reader.recordLine();
    if (fields.size() > kMaxTableColumns)
        throw TableError(source, headerLine, static_cast<int>(kMaxTableColumns) + 1, "",
                         "the header row has " + std::to_string(fields.size()) + " columns; a table may have at most " +
                             std::to_string(kMaxTableColumns));
    std::unordered_map<std::string, std::size_t> seen;  // name -> 0-based column
    seen.reserve(fields.size());
    for (std::size_t c = 0; c < fields.size(); ++c) {
        std::string name(fields[c].quoted ? fields[c].text : trimmed(fields[c].text, sep));
        const int column = static_cast<int>(c) + 1;
        if (name.empty()) throw TableError(source, headerLine, column, "", "empty column name in the header row");
        if (const auto bad = firstInvalidUtf8(name); bad != std::string::npos)
            throw TableError(source, headerLine, column, "",
                             "the column name " + shown(name) + " is not UTF-8 text (save the file as UTF-8)");
        for (std::size_t k = 0; k < name.size(); ++k)
            // Line breaks and tabs inside a quoted name are text (RFC 4180); other control
            // characters (an escape sequence would act on the terminal) are refused.
            if (const auto b = static_cast<unsigned char>(name[k]);
                (b < 0x20 && b != '\t' && b != '\n' && b != '\r') || b == 0x7F)
                throw TableError(source, headerLine, column, "",
                                 "the column name " + shown(name) + " holds a control character (code " +
                                     std::to_string(b) + "); column names are printable text");
        if (const auto [at, fresh] = seen.emplace(name, c); !fresh)
            throw TableError(source, headerLine, column, name,
                             "column name '" + name + "' repeats column " + std::to_string(at->second + 1));
        table.columnNames.push_back(std::move(name));
    }
    const std::size_t ncols = table.columnNames.size();
    table.columns.assign(ncols, {});

    std::vector<double> row(ncols);
    while (reader.nextContentLine()) {
        reader.read(sep, fields);
        const long line = reader.recordLine();
        if (fields.size() > ncols) {
            const int column = static_cast<int>(ncols) + 1;
            throw TableError(source, line, column, std::string(fields[ncols].text),
                             std::to_string(fields.size()) + " cells, but the header (line " +
                                 std::to_string(headerLine) + ") has " + std::to_string(ncols) +
                                 " columns; extra cell " + shown(fields[ncols].text));
        }
        bool incomplete = fields.size() < ncols;
        if (incomplete && !options.dropIncompleteRows) {
            const std::size_t missing = fields.size();
            throw TableError(source, line, static_cast<int>(missing) + 1, "",
                             std::to_string(fields.size()) + (fields.size() == 1 ? " cell" : " cells") +
                                 ", but the header (line " + std::to_string(headerLine) + ") has " +
                                 std::to_string(ncols) + " columns; column '" + table.columnNames[missing] +
                                 "' is missing (to skip such rows: 'skip rows with missing values' in the window, fit --drop-incomplete, or objective.drop_incomplete_rows in a study)");
        }
        for (std::size_t c = 0; c < fields.size() && !incomplete; ++c) {
            std::string_view cell = fields[c].quoted ? trimmed(fields[c].text, sep) : fields[c].text;
            const int column = static_cast<int>(c) + 1;
            if (looksMissing(cell)) {
                if (options.dropIncompleteRows) {
                    incomplete = true;
                    break;
                }
                throw TableError(source, line, column, std::string(cell),
                                 "column '" + table.columnNames[c] + "': " +
                                     (cell.empty() ? std::string("empty cell") : "missing value " + shown(cell)) +
                                     " (to skip such rows: 'skip rows with missing values' in the window, fit --drop-incomplete, or objective.drop_incomplete_rows in a study)");
            }
            // The one number rule (core/expr/number_text.h): overflow and underflow are out of range.
            const NumberStatus status = readDecimal(cell, row[c]);
            if (status == NumberStatus::TooLarge || status == NumberStatus::TooSmall)
                throw TableError(source, line, column, std::string(cell),
                                 "column '" + table.columnNames[c] + "': " + outOfRangeText(cell, status));
            if (status != NumberStatus::Ok) {
                std::string reason = "column '" + table.columnNames[c] + "': " + shown(cell) + " is not a number";
                if (cell.find(',') != std::string_view::npos) reason += " (use '.' as the decimal point)";
                throw TableError(source, line, column, std::string(cell), reason);
            }
            if (!std::isfinite(row[c]))
                throw TableError(source, line, column, std::string(cell),
                                 "column '" + table.columnNames[c] + "': " + shown(cell) + " is not a finite number");
        }
        if (incomplete) {
            ++table.droppedRows;
            continue;
        }
        for (std::size_t c = 0; c < ncols; ++c) table.columns[c].push_back(row[c]);
        table.rowLines.push_back(line);
    }
    if (table.rowCount() == 0) {
        if (table.droppedRows > 0)
            throw TableError(source, 0, 0, "",
                             "every data row was incomplete (" + std::to_string(table.droppedRows) + " dropped)");
        throw TableError(source, headerLine, 0, "", "the table has a header row but no data rows");
    }
    return table;
}

Table readTable(const std::string& path, const TableReadOptions& options) {
    std::string text;
    try {
        text = readTextFile(path, kMaxTableBytes);  // pipes and /proc files too; stops at a NUL
    } catch (const TextFileError& e) {
        throw TableError(path, 0, 0, "", std::string("the data file ") + e.what());
    }
    return parseTable(text, options, path);
}

static std::string quotedIfNeeded(const std::string& s) {
    // A name that starts with the UTF-8 byte-order mark is quoted too: unquoted at the start of
    // the file, a reader takes those bytes for the file's BOM and drops them (found by fuzzing).
    bool need = s.empty() || s.front() == ' ' || s.back() == ' ' || s.front() == '#' ||
                s.rfind("\xEF\xBB\xBF", 0) == 0 || s.find_first_of(",;\t\"\r\n") != std::string::npos;
    if (!need) return s;
    std::string q = "\"";
    for (char c : s) {
        q += c;
        if (c == '"') q += '"';
    }
    return q + "\"";
}

std::string writeTable(const Table& table) {
    std::string out;
    for (std::size_t c = 0; c < table.columnNames.size(); ++c) {
        if (c) out += ',';
        out += quotedIfNeeded(table.columnNames[c]);  // appended apart: GCC 12 -O3 warns -Wrestrict on "," + string
    }
    out += '\n';
    char buffer[64];
    for (std::size_t r = 0; r < table.rowCount(); ++r) {
        for (std::size_t c = 0; c < table.columns.size(); ++c) {
            if (c) out += ',';
            auto [ptr, ec] = std::to_chars(buffer, buffer + sizeof buffer, table.columns[c][r]);
            out.append(buffer, ec == std::errc() ? ptr : buffer);
        }
        out += '\n';
    }
    return out;
}

}  // namespace sw
