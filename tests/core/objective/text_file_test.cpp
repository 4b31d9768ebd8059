// Reading whole text files and streams with a stated limit (core/objective/text_file.h).
#include "core/objective/table.h"
#include "core/objective/text_file.h"

#include <gtest/gtest.h>

#include <unistd.h>

#include <filesystem>
#include <fstream>

namespace fs = std::filesystem;

namespace {
fs::path scratch(const std::string& name) {
    const fs::path dir = fs::temp_directory_path() / ("sw-text-file-" + std::to_string(::getpid()));
    fs::create_directories(dir);
    return dir / name;
}
std::string messageOf(const std::string& path, std::uintmax_t limit) {
    try {
        sw::readTextFile(path, limit);
    } catch (const sw::TextFileError& e) {
        return e.what();
    }
    return "";
}
}  // namespace

TEST(TextFile, ProcFilesAreReadAsStreams) {
    // /proc files report size 0; the old reader trusted that and saw an empty file.
    EXPECT_EQ(fs::file_size("/proc/self/status"), 0u);
    const std::string text = sw::readTextFile("/proc/self/status", sw::kMaxTableBytes);
    EXPECT_NE(text.find("Pid:"), std::string::npos);
}

TEST(TextFile, DirectoriesMissingFilesAndLimitsAreNamed) {
    EXPECT_EQ(messageOf(fs::temp_directory_path().string(), 100), "is a directory, not a file");
    EXPECT_EQ(messageOf("/no/such/file.csv", 100), "does not exist");
    const fs::path big = scratch("big.txt");
    std::ofstream(big) << std::string(101, 'x');
    EXPECT_EQ(messageOf(big.string(), 100), "is 101 bytes; the limit is 100 bytes");
    EXPECT_EQ(sw::byteSizeText(sw::kMaxTableBytes), "1 GiB");
    EXPECT_EQ(sw::byteSizeText(sw::kMaxStudyBytes), "16 MiB");
    fs::remove_all(big.parent_path());
}

TEST(TextFile, ReadingStopsAtTheFirstNul) {
    // /dev/zero never ends; the reader returns at its first NUL and the table names it.
    const std::string text = sw::readTextFile("/dev/zero", sw::kMaxTableBytes);
    EXPECT_EQ(text, std::string(1, '\0'));
    try {
        sw::readTable("/dev/zero");
        FAIL();
    } catch (const sw::TableError& e) {
        EXPECT_EQ(e.line(), 1);
        EXPECT_NE(std::string(e.what()).find("a NUL byte"), std::string::npos) << e.what();
    }
}

TEST(TextFile, CrOnlyLineEndsAreNamed) {
    try {
        sw::parseTable("x,y\r1,2\r3,4\r");
        FAIL();
    } catch (const sw::TableError& e) {
        EXPECT_NE(std::string(e.what()).find("CR-only line ends"), std::string::npos) << e.what();
    }
    // CRLF is fine, and so is a lone CR at the very end.
    EXPECT_EQ(sw::parseTable("x,y\r\n1,2\r\n3,4\r\n").rowCount(), 2u);
    EXPECT_EQ(sw::parseTable("x,y\n1,2\r").rowCount(), 1u);
}

TEST(TextFile, PlaceOfAByteCountsCharacters) {
    const sw::TextPlace place = sw::placeOfByte("ab\n\xC3\xA9z", 5);
    EXPECT_EQ(place.line, 2);
    EXPECT_EQ(place.column, 2);
}
