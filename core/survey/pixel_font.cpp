// A 5 x 7 pixel font drawn for Saddlewise's pictures (basin maps written by the command line,
// where no GUI toolkit and no font files are available). Capitals, digits and the punctuation
// the labels use; each glyph is seven rows of five pixels, '#' set.
#include "core/survey/picture.h"

#include <array>
#include <cctype>
#include <string_view>

namespace sw::survey {

namespace {

struct Glyph {
    char c;
    std::string_view rows;  // 35 characters, row by row
};

constexpr std::array kGlyphs = {
    Glyph{'A', ".###.#...##...#######...##...##...#"}, Glyph{'B', "####.#...##...#####.#...##...#####."},
    Glyph{'C', ".###.#...##....#....#....#...#.###."}, Glyph{'D', "####.#...##...##...##...##...#####."},
    Glyph{'E', "######....#....####.#....#....#####"}, Glyph{'F', "######....#....####.#....#....#...."},
    Glyph{'G', ".###.#...##....#.####...##...#.####"}, Glyph{'H', "#...##...##...#######...##...##...#"},
    Glyph{'I', ".###...#....#....#....#....#...###."}, Glyph{'J', "..###...#....#....#....#.#..#..##.."},
    Glyph{'K', "#...##..#.#.#..##...#.#..#..#.#...#"}, Glyph{'L', "#....#....#....#....#....#....#####"},
    Glyph{'M', "#...###.###.#.##.#.##...##...##...#"}, Glyph{'N', "#...##...###..##.#.##..###...##...#"},
    Glyph{'O', ".###.#...##...##...##...##...#.###."}, Glyph{'P', "####.#...##...#####.#....#....#...."},
    Glyph{'Q', ".###.#...##...##...##.#.##..#..##.#"}, Glyph{'R', "####.#...##...#####.#.#..#..#.#...#"},
    Glyph{'S', ".#####....#.....###.....#....#####."}, Glyph{'T', "#####..#....#....#....#....#....#.."},
    Glyph{'U', "#...##...##...##...##...##...#.###."}, Glyph{'V', "#...##...##...##...##...#.#.#...#.."},
    Glyph{'W', "#...##...##...##.#.##.#.##.#.#.#.#."}, Glyph{'X', "#...##...#.#.#...#...#.#.#...##...#"},
    Glyph{'Y', "#...##...#.#.#...#....#....#....#.."}, Glyph{'Z', "#####....#...#...#...#...#....#####"},
    Glyph{'0', ".###.#...##..###.#.###..##...#.###."}, Glyph{'1', "..#...##....#....#....#....#...###."},
    Glyph{'2', ".###.#...#....#...#...#...#...#####"}, Glyph{'3', "#####...#...#.....#.....##...#.###."},
    Glyph{'4', "...#...##..#.#.#..#.#####...#....#."}, Glyph{'5', "######....####.....#....##...#.###."},
    Glyph{'6', "..##..#...#....####.#...##...#.###."}, Glyph{'7', "#####....#...#...#...#....#....#..."},
    Glyph{'8', ".###.#...##...#.###.#...##...#.###."}, Glyph{'9', ".###.#...##...#.####....#...#..##.."},
    Glyph{' ', "..................................."}, Glyph{'.', "..........................##...##.."},
    Glyph{',', ".....................##....#...#..."}, Glyph{':', "......##...##........##...##......."},
    Glyph{'-', "...............#####..............."}, Glyph{'+', ".......#....#..#####..#....#......."},
    Glyph{'=', "..........#####.....#####.........."}, Glyph{'(', "...#...#...#....#....#.....#.....#."},
    Glyph{')', ".#.....#.....#....#....#...#...#..."}, Glyph{'#', ".#.#..#.#.#####.#.#.#####.#.#..#.#."},
    Glyph{'/', ".........#...#...#...#...#........."}, Glyph{'%', "##...##..#...#...#...#...#..##...##"},
    Glyph{'_', "..............................#####"}, Glyph{'*', ".......#..#.#.#.###.#.#.#..#......."},
    Glyph{'[', ".###..#....#....#....#....#....###."}, Glyph{']', ".###....#....#....#....#....#..###."},
    Glyph{'|', "..#....#....#....#....#....#....#.."}, Glyph{'\'', "..#....#...#......................."},
    Glyph{'?', ".###.#...#....#...#...#.........#.."}, Glyph{'!', "..#....#....#....#....#.........#.."},
    Glyph{'<', "...#...#...#...#.....#.....#.....#."}, Glyph{'>', ".#.....#.....#.....#...#...#...#..."},
    Glyph{'^', "..#...#.#.#...#...................."}, Glyph{'~', "...........#..##.#.##..#..........."},
};

const Glyph& glyphFor(char c) {
    const char upper = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
    for (const Glyph& g : kGlyphs)
        if (g.c == upper) return g;
    for (const Glyph& g : kGlyphs)
        if (g.c == '?') return g;
    return kGlyphs.front();
}

constexpr int kAdvance = 6;  // 5 pixels and a gap

}  // namespace

int textWidth(const std::string& text, int scale) {
    return text.empty() ? 0 : (static_cast<int>(text.size()) * kAdvance - 1) * scale;
}

int drawText(Image& image, int x, int y, const std::string& text, Rgb colour, int scale) {
    int cursor = x;
    for (char c : text) {
        const Glyph& g = glyphFor(c);
        for (int row = 0; row < 7; ++row)
            for (int column = 0; column < 5; ++column)
                if (g.rows[static_cast<std::size_t>(row * 5 + column)] == '#')
                    image.fillRect(cursor + column * scale, y + row * scale, scale, scale, colour);
        cursor += kAdvance * scale;
    }
    return cursor - x;
}

}  // namespace sw::survey
