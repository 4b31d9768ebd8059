// Basin pictures: colours, one pixel per cell, and a PNG that decodes back to the same pixels.
#include "core/objective/formula_objective.h"
#include "core/survey/picture.h"

#include <gtest/gtest.h>
#include <zlib.h>

#include <cstdio>
#include <fstream>
#include <set>
#include <sstream>

namespace {

using namespace sw::survey;

std::uint32_t readUint32(const std::string& s, std::size_t at) {
    return (static_cast<std::uint32_t>(static_cast<unsigned char>(s[at])) << 24) |
           (static_cast<std::uint32_t>(static_cast<unsigned char>(s[at + 1])) << 16) |
           (static_cast<std::uint32_t>(static_cast<unsigned char>(s[at + 2])) << 8) |
           static_cast<std::uint32_t>(static_cast<unsigned char>(s[at + 3]));
}

TEST(Picture, PngDecodesBackToTheSamePixels) {
    // The PNG layout of ISO/IEC 15948 read back by hand: signature, IHDR, IDAT (zlib), IEND, each
    // chunk's CRC-32 checked with zlib's crc32.
    Image image(7, 5);
    for (int y = 0; y < 5; ++y)
        for (int x = 0; x < 7; ++x)
            image.set(x, y, Rgb{static_cast<std::uint8_t>(x * 30), static_cast<std::uint8_t>(y * 50), 7});
    const std::string png = encodePng(image);
    ASSERT_EQ(png.substr(0, 8), std::string("\x89PNG\r\n\x1a\n", 8));
    std::size_t at = 8;
    std::string idat;
    std::vector<std::string> types;
    while (at < png.size()) {
        const std::uint32_t length = readUint32(png, at);
        const std::string type = png.substr(at + 4, 4);
        const std::string data = png.substr(at + 8, length);
        const std::uint32_t crc = readUint32(png, at + 8 + length);
        const std::string typed = type + data;
        EXPECT_EQ(crc, crc32(0L, reinterpret_cast<const Bytef*>(typed.data()), static_cast<uInt>(typed.size()))) << type;
        types.push_back(type);
        if (type == "IHDR") {
            EXPECT_EQ(readUint32(data, 0), 7u);
            EXPECT_EQ(readUint32(data, 4), 5u);
            EXPECT_EQ(data[8], 8);
            EXPECT_EQ(data[9], 2);
        }
        if (type == "IDAT") idat += data;
        at += 12 + length;
    }
    EXPECT_EQ(types, (std::vector<std::string>{"IHDR", "IDAT", "IEND"}));
    std::string raw(5 * (1 + 7 * 3), '\0');
    uLongf size = raw.size();
    ASSERT_EQ(uncompress(reinterpret_cast<Bytef*>(raw.data()), &size, reinterpret_cast<const Bytef*>(idat.data()),
                         static_cast<uLong>(idat.size())),
              Z_OK);
    ASSERT_EQ(size, raw.size());
    for (int y = 0; y < 5; ++y) {
        EXPECT_EQ(raw[static_cast<std::size_t>(y) * 22], '\0');
        for (int x = 0; x < 7; ++x)
            for (int c = 0; c < 3; ++c)
                EXPECT_EQ(static_cast<unsigned char>(raw[static_cast<std::size_t>(y) * 22 + 1 + x * 3 + c]),
                          image.rgb[(static_cast<std::size_t>(y) * 7 + x) * 3 + c]);
    }
}

TEST(Picture, OutcomesThatAreNotPointsAreNeutralAndPointsAreNot) {
    std::set<std::tuple<int, int, int>> seen;
    for (std::size_t k = 0; k < 12; ++k) {
        const Rgb c = pointColour(k);
        EXPECT_GT(std::max({c.r, c.g, c.b}) - std::min({c.r, c.g, c.b}), 60) << "saturated: " << k;
        seen.insert({c.r, c.g, c.b});
    }
    EXPECT_EQ(seen.size(), 12u);
    for (int code : {kCellLimit, kCellDiverged, kCellFailed, kCellOutside}) {
        const Rgb c = codeColour(code);
        EXPECT_LE(std::max({c.r, c.g, c.b}) - std::min({c.r, c.g, c.b}), 20) << "neutral: " << code;
    }
}

TEST(Picture, BasinImageHasOnePixelPerCellWithTheTopRowAtLargestY) {
    const sw::FormulaObjective f("(a^2 - 1)^2 + (b^2 - 1)^2 + 0.5*a*b", {"a", "b"});
    Region r;
    r.lower = sw::Vector::Constant(2, -1.6);
    r.upper = sw::Vector::Constant(2, 1.6);
    r.held = sw::Vector::Zero(2);
    BasinSettings settings;
    settings.grid = 16;
    const BasinSurvey s = mapBasins(f, r, {{"", "trust-region-exact", {}}, {"", "newton", {}}}, settings);
    const Image one = basinImage(s, 0);
    ASSERT_EQ(one.width, 16);
    ASSERT_EQ(one.height, 16);
    for (int j = 0; j < 16; ++j)
        for (int i = 0; i < 16; ++i) EXPECT_EQ(one.at(i, 15 - j), cellColour(s.maps[0], j * 16 + i));
    const Image picture = basinPicture(s, 120);
    EXPECT_GE(picture.width, 2 * 120);
    EXPECT_GT(picture.height, 120);
    const std::string path = SW_BINARY_DIR "/picture_test.png";
    writePng(picture, path);
    std::ifstream in(path, std::ios::binary);
    std::stringstream bytes;
    bytes << in.rdbuf();
    EXPECT_EQ(bytes.str(), encodePng(picture));
    std::remove(path.c_str());
    EXPECT_THROW(writePng(picture, "/nonexistent-folder/x.png"), std::runtime_error);
}

TEST(Picture, TextIsDrawnInCapitalsOfFiveBySevenPixels) {
    Image image(40, 10);
    EXPECT_EQ(textWidth("AB", 1), 11);
    EXPECT_EQ(drawText(image, 1, 1, "ab", Rgb{0, 0, 0}, 1), 12);
    // 'A' has its apex at the second to fourth pixel of the top row.
    EXPECT_EQ(image.at(1, 1), (Rgb{255, 255, 255}));
    EXPECT_EQ(image.at(2, 1), (Rgb{0, 0, 0}));
    EXPECT_EQ(image.at(1, 2), (Rgb{0, 0, 0}));
}

}  // namespace
