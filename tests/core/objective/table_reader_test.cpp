// CSV reading: separators, quoting, BOM, comments, and every error with its line and column.
// Expected values are common practice for CSV (RFC 4180 quoting), no published source.
#include "core/objective/table.h"

#include <gtest/gtest.h>

#include <chrono>
#include <cstdio>
#include <fstream>
#include <string>

using sw::parseTable;
using sw::Separator;
using sw::Table;
using sw::TableError;
using sw::TableReadOptions;

namespace {

TableError errorOf(const std::string& text, TableReadOptions options = {}) {
    try {
        parseTable(text, options, "t.csv");
    } catch (const TableError& e) {
        return e;
    }
    ADD_FAILURE() << "no error for:\n" << text;
    return TableError("", -1, -1, "", "");
}

}  // namespace

TEST(TableReader, ReadsACommaSeparatedTableAndReportsTheDetectedSeparator) {
    Table t = parseTable("x,y\n1,2\n3.5,-4e-3\n");
    ASSERT_EQ(t.columnCount(), 2);
    EXPECT_EQ(t.columnNames[0], "x");
    EXPECT_EQ(t.columnNames[1], "y");
    ASSERT_EQ(t.rowCount(), 2u);
    EXPECT_DOUBLE_EQ(t.columns[0][1], 3.5);
    EXPECT_DOUBLE_EQ(t.columns[1][1], -4e-3);
    EXPECT_EQ(t.separator, Separator::Comma);
    EXPECT_TRUE(t.separatorDetected);
    EXPECT_NE(t.summary().find("comma-separated (detected)"), std::string::npos);
}

TEST(TableReader, DetectsSemicolonAndTabSeparators) {
    Table s = parseTable("a;b;c\n1;2;3\n");
    EXPECT_EQ(s.separator, Separator::Semicolon);
    EXPECT_EQ(s.columnCount(), 3);
    Table t = parseTable("a\tb\n1\t2\n");
    EXPECT_EQ(t.separator, Separator::Tab);
    EXPECT_DOUBLE_EQ(t.columns[1][0], 2.0);
}

TEST(TableReader, UsesAGivenSeparatorInsteadOfGuessing) {
    TableReadOptions o;
    o.separator = Separator::Semicolon;
    Table t = parseTable("a,b;c\n1;2\n", o);
    EXPECT_FALSE(t.separatorDetected);
    ASSERT_EQ(t.columnCount(), 2);
    EXPECT_EQ(t.columnNames[0], "a,b");
}

TEST(TableReader, SkipsAUtf8ByteOrderMarkAndSaysSo) {
    Table t = parseTable("\xEF\xBB\xBFtime,value\n0,1\n");
    EXPECT_TRUE(t.hadByteOrderMark);
    EXPECT_EQ(t.columnNames[0], "time");
    Table plain = parseTable("time,value\n0,1\n");
    EXPECT_FALSE(plain.hadByteOrderMark);
}

TEST(TableReader, RefusesUtf16WithAMessage) {
    TableError e = errorOf(std::string("\xFF\xFEx", 3));
    EXPECT_NE(std::string(e.what()).find("UTF-16"), std::string::npos);
}

TEST(TableReader, IgnoresCommentAndBlankLinesButCountsThemInLineNumbers) {
    Table t = parseTable("# measured on the bench\n\nx,y\n  # a comment\n1,2\n\n3,4\r\n");
    ASSERT_EQ(t.rowCount(), 2u);
    EXPECT_EQ(t.rowLines[0], 5);
    EXPECT_EQ(t.rowLines[1], 7);
    TableError e = errorOf("# c\n\nx,y\n1,2\n# c\n3,oops\n");
    EXPECT_EQ(e.line(), 6);
    EXPECT_EQ(e.column(), 2);
}

TEST(TableReader, HandlesWindowsLineEndingsAndSpacesAroundNumbers) {
    Table t = parseTable("x , y\r\n 1 , 2 \r\n+3,4E2\r\n");
    EXPECT_EQ(t.columnNames[0], "x");
    EXPECT_EQ(t.columnNames[1], "y");
    EXPECT_DOUBLE_EQ(t.columns[0][1], 3.0);
    EXPECT_DOUBLE_EQ(t.columns[1][1], 400.0);
}

TEST(TableReader, ReadsQuotedFieldsWithSeparatorsQuotesAndLineBreaks) {
    Table t = parseTable("\"a, b\",\"say \"\"hi\"\"\",\"two\nlines\"\n\"1.5\",2,3\n4,5,6\n");
    ASSERT_EQ(t.columnCount(), 3);
    EXPECT_EQ(t.columnNames[0], "a, b");
    EXPECT_EQ(t.columnNames[1], "say \"hi\"");
    EXPECT_EQ(t.columnNames[2], "two\nlines");
    EXPECT_DOUBLE_EQ(t.columns[0][0], 1.5);
    EXPECT_EQ(t.rowLines[0], 3);  // the header spans lines 1-2
}

TEST(TableReader, RoundTripsQuotedNamesAndNumbersThroughWriteTable) {
    Table t;
    t.columnNames = {"plain", "with,comma", "with \"quote\"", " padded", "semi;colon"};
    t.columns = {{1.0, -0.1}, {1e-300, 2.5}, {3.0, 1.0 / 3.0}, {0.0, 7.0}, {1e300, -2.0}};
    Table back = parseTable(sw::writeTable(t));
    EXPECT_EQ(back.columnNames, t.columnNames);
    EXPECT_EQ(back.columns, t.columns);  // exact: shortest round-trip digits
}

// Found by the table fuzzer (tests/fuzz/regressions/table/bom-inside-a-quoted-name.csv): a quoted
// first name that starts with the UTF-8 byte-order mark lost those bytes in a round trip, since
// the writer left it unquoted at the start of the file, where a reader drops a BOM.
TEST(TableReader, AFirstNameStartingWithTheByteOrderMarkSurvivesARoundTrip) {
    Table t;
    t.columnNames = {"\xEF\xBB\xBFq", "r"};
    t.columns = {{5.0}, {3.0}};
    const Table back = parseTable(sw::writeTable(t));
    EXPECT_EQ(back.columnNames, t.columnNames);
    // A real BOM before the header is still the file's mark, not part of the first name.
    EXPECT_EQ(parseTable("\xEF\xBB\xBFq,r\n5,3\n").columnNames, (std::vector<std::string>{"q", "r"}));
}

TEST(TableReader, NamesLineColumnAndTextOfANonNumericCell) {
    TableError e = errorOf("x,temperature\n1,2\n3,warm\n");
    EXPECT_EQ(e.line(), 3);
    EXPECT_EQ(e.column(), 2);
    EXPECT_EQ(e.found(), "warm");
    std::string m = e.what();
    EXPECT_NE(m.find("t.csv: line 3, column 2"), std::string::npos) << m;
    EXPECT_NE(m.find("'temperature'"), std::string::npos) << m;
    EXPECT_NE(m.find("'warm' is not a number"), std::string::npos) << m;
}

TEST(TableReader, HintsAtTheDecimalPointWhenACellHasADecimalComma) {
    TableError e = errorOf("x;y\n1;2,5\n");
    EXPECT_EQ(e.column(), 2);
    EXPECT_NE(std::string(e.what()).find("use '.' as the decimal point"), std::string::npos);
}

TEST(TableReader, RefusesInfinityNanAndLocaleStyleNumbers) {
    EXPECT_EQ(errorOf("x\ninf\n").line(), 2);
    EXPECT_EQ(errorOf("x\nnan\n").line(), 2);
    EXPECT_EQ(errorOf("x\n1e999\n").line(), 2);
    EXPECT_EQ(errorOf("x\n1 000\n").line(), 2);
    EXPECT_EQ(errorOf("x\n0x10\n").line(), 2);
}

TEST(TableReader, ReportsARaggedRowWithTooManyCells) {
    TableError e = errorOf("a,b\n1,2\n3,4,5\n");
    EXPECT_EQ(e.line(), 3);
    EXPECT_EQ(e.column(), 3);
    EXPECT_NE(std::string(e.what()).find("3 cells, but the header (line 1) has 2 columns"), std::string::npos)
        << e.what();
}

TEST(TableReader, ReportsARaggedRowWithTooFewCells) {
    TableError e = errorOf("a,b,c\n1,2,3\n4,5\n");
    EXPECT_EQ(e.line(), 3);
    EXPECT_EQ(e.column(), 3);
    EXPECT_NE(std::string(e.what()).find("column 'c' is missing"), std::string::npos) << e.what();
}

TEST(TableReader, ReportsAnEmptyCellWithItsPlace) {
    TableError e = errorOf("a,b\n1,\n");
    EXPECT_EQ(e.line(), 2);
    EXPECT_EQ(e.column(), 2);
    EXPECT_NE(std::string(e.what()).find("empty cell"), std::string::npos);
}

TEST(TableReader, DropsIncompleteRowsOnlyWhenAskedAndCountsThem) {
    TableReadOptions o;
    o.dropIncompleteRows = true;
    Table t = parseTable("a,b\n1,2\n3,\n4\nNA,5\n6,7\n", o);
    EXPECT_EQ(t.rowCount(), 2u);
    EXPECT_EQ(t.droppedRows, 3);
    EXPECT_DOUBLE_EQ(t.columns[0][1], 6.0);
    EXPECT_NE(t.summary().find("3 incomplete rows dropped"), std::string::npos) << t.summary();
    // Too many cells is never "incomplete": still an error.
    EXPECT_EQ(errorOf("a,b\n1,2,3\n", o).line(), 2);
    // Non-numeric text is never dropped silently.
    EXPECT_EQ(errorOf("a,b\n1,x\n", o).column(), 2);
}

TEST(TableReader, ReportsAnEmptyTable) {
    EXPECT_NE(std::string(errorOf("").what()).find("empty"), std::string::npos);
    EXPECT_NE(std::string(errorOf("# only a comment\n\n").what()).find("empty"), std::string::npos);
    TableError e = errorOf("x,y\n");
    EXPECT_EQ(e.line(), 1);
    EXPECT_NE(std::string(e.what()).find("no data rows"), std::string::npos);
    TableReadOptions o;
    o.dropIncompleteRows = true;
    EXPECT_NE(std::string(errorOf("x,y\n1,\n", o).what()).find("every data row was incomplete"), std::string::npos);
}

TEST(TableReader, ReportsEmptyAndRepeatedColumnNames) {
    TableError empty = errorOf("x,,z\n1,2,3\n");
    EXPECT_EQ(empty.line(), 1);
    EXPECT_EQ(empty.column(), 2);
    EXPECT_NE(std::string(empty.what()).find("empty column name"), std::string::npos);
    TableError repeated = errorOf("x,y,x\n1,2,3\n");
    EXPECT_EQ(repeated.column(), 3);
    EXPECT_NE(std::string(repeated.what()).find("'x' repeats column 1"), std::string::npos);
}

TEST(TableReader, ReportsAnUnclosedQuoteAndStrayQuotes) {
    TableError open = errorOf("x,y\n1,\"2\n3,4\n");
    EXPECT_EQ(open.line(), 2);
    EXPECT_EQ(open.column(), 2);
    EXPECT_NE(std::string(open.what()).find("never closed"), std::string::npos);
    TableError after = errorOf("x,y\n1,\"2\"3\n");
    EXPECT_EQ(after.column(), 2);
    TableError inside = errorOf("x,y\n1,2\"3\n");
    EXPECT_EQ(inside.line(), 2);
    EXPECT_EQ(inside.column(), 2);
}

TEST(TableReader, ReportsAMissingFile) {
    try {
        sw::readTable("/nonexistent/dir/data.csv");
        FAIL();
    } catch (const TableError& e) {
        EXPECT_NE(std::string(e.what()).find("/nonexistent/dir/data.csv"), std::string::npos);
        EXPECT_NE(std::string(e.what()).find("the data file does not exist"), std::string::npos) << e.what();
    }
}

TEST(TableReader, ReadsAFileFromDisk) {
    std::string path = std::string(SW_BINARY_DIR) + "/table_reader_test.csv";
    {
        std::ofstream out(path, std::ios::binary);
        out << "\xEF\xBB\xBF" << "t;v\r\n0;1.5\r\n1;2.5\r\n";
    }
    Table t = sw::readTable(path);
    EXPECT_EQ(t.source, path);
    EXPECT_EQ(t.separator, Separator::Semicolon);
    EXPECT_DOUBLE_EQ(t.columns[1][1], 2.5);
    std::remove(path.c_str());
}

TEST(TableReader, LoadsTwoHundredThousandRowsCorrectly) {
    // Size check only (speed is measured in bench_fit): every value survives.
    std::string text = "i,x,y\n";
    for (int i = 0; i < 200000; ++i) text += std::to_string(i) + "," + std::to_string(i * 0.5) + ",1e-3\n";
    Table t = parseTable(text);
    ASSERT_EQ(t.rowCount(), 200000u);
    EXPECT_DOUBLE_EQ(t.columns[0][199999], 199999.0);
    EXPECT_DOUBLE_EQ(t.columns[1][12345], 6172.5);
}
