#pragma once
// Pictures of basin surveys without a GUI toolkit: an RGB image per method (one pixel per
// cell), the colours every view of a survey shares, a small-multiples picture with titles,
// critical-point markers and a legend, and a minimal PNG writer (zlib's deflate and CRC-32).
//
// Colours (our own choice): each critical point gets a saturated hue (twelve picked by hand,
// neighbouring indices far apart; then golden-angle steps); the outcomes that are not a
// point are neutral, so they read as "shown apart": limit = mid grey, diverged = near black,
// failed = light grey, outside = white, not run = a pale blue-grey. Basin cells are darkened
// with the run's iterations on a log scale: full colour for the fastest runs, 55 % darker for
// the slowest in the map.

#include "core/survey/survey.h"

#include <cstdint>
#include <string>
#include <vector>

namespace sw::survey {

struct Rgb {
    std::uint8_t r = 0, g = 0, b = 0;
    bool operator==(const Rgb&) const = default;
};

struct Image {
    int width = 0, height = 0;
    std::vector<std::uint8_t> rgb;  // row-major from the top row, 3 bytes per pixel
    Image() = default;
    Image(int w, int h, Rgb fill = {255, 255, 255});
    Rgb at(int x, int y) const;
    void set(int x, int y, Rgb colour);  // ignores pixels outside the image
    void fillRect(int x, int y, int w, int h, Rgb colour);
};

Rgb pointColour(std::size_t pointIndex);
Rgb codeColour(int code);  // a BasinCode
// The cell's colour: its point's (or code's) colour, darkened by its iterations.
Rgb cellColour(const BasinMap& map, long cell);

// One pixel per cell, the top row at the largest y (as a plot shows it).
Image basinImage(const BasinSurvey& survey, std::size_t method);

// Every method's map side by side (small multiples), each `panelPixels` wide and high, with
// the method's label over it, the critical points marked by kind (minimum: disc, saddle:
// square with a cross, maximum: triangle, degenerate: diamond) and a legend under the panels.
Image basinPicture(const BasinSurvey& survey, int panelPixels = 300);

// Text in a 5 x 7 pixel font of our own (capitals, digits, common punctuation; lower case is
// drawn as capitals), each pixel `scale` pixels wide. Returns the width drawn.
int drawText(Image& image, int x, int y, const std::string& text, Rgb colour, int scale = 1);
int textWidth(const std::string& text, int scale = 1);

// Writes an 8-bit RGB PNG (ISO/IEC 15948: signature, IHDR, one zlib-compressed IDAT with
// filter 0 per row, IEND). Throws std::runtime_error naming the path and the reason.
void writePng(const Image& image, const std::string& path);
// The PNG file's bytes (for tests and for writers that keep the file themselves).
std::string encodePng(const Image& image);

}  // namespace sw::survey
