// Basin pictures and a minimal PNG writer; see picture.h.
//
// Why our own writer: the command line is Qt-free, and a PNG of an RGB image needs only
// deflate and CRC-32, which zlib (already on every system that has Qt) provides; libpng's
// setjmp-based error handling would add more code than the ~40 lines below.
#include "core/survey/picture.h"

#include <zlib.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <iterator>
#include <stdexcept>

namespace sw::survey {

namespace {

Rgb hsv(double hueDegrees, double saturation, double value) {
    const double h = std::fmod(hueDegrees, 360.0) / 60.0;
    const double c = value * saturation;
    const double x = c * (1 - std::abs(std::fmod(h, 2.0) - 1));
    double r = 0, g = 0, b = 0;
    if (h < 1)
        r = c, g = x;
    else if (h < 2)
        r = x, g = c;
    else if (h < 3)
        g = c, b = x;
    else if (h < 4)
        g = x, b = c;
    else if (h < 5)
        r = x, b = c;
    else
        r = c, b = x;
    const double m = value - c;
    auto byte = [](double v) { return static_cast<std::uint8_t>(std::lround(std::clamp(v, 0.0, 1.0) * 255)); };
    return {byte(r + m), byte(g + m), byte(b + m)};
}

Rgb scaled(Rgb c, double factor) {
    auto s = [&](std::uint8_t v) { return static_cast<std::uint8_t>(std::lround(v * factor)); };
    return {s(c.r), s(c.g), s(c.b)};
}

constexpr Rgb kInk{25, 25, 30};
constexpr Rgb kSubtleInk{90, 90, 100};
constexpr Rgb kWhite{255, 255, 255};

void fillCircle(Image& image, int cx, int cy, int radius, Rgb colour) {
    for (int dy = -radius; dy <= radius; ++dy)
        for (int dx = -radius; dx <= radius; ++dx)
            if (dx * dx + dy * dy <= radius * radius + radius) image.set(cx + dx, cy + dy, colour);
}

void fillTriangle(Image& image, int cx, int cy, int radius, Rgb colour) {
    // Pointing up: the apex at the top, the base at the bottom.
    for (int dy = -radius; dy <= radius; ++dy) {
        const int half = (dy + radius) / 2;
        for (int dx = -half; dx <= half; ++dx) image.set(cx + dx, cy + dy, colour);
    }
}

void fillDiamond(Image& image, int cx, int cy, int radius, Rgb colour) {
    for (int dy = -radius; dy <= radius; ++dy)
        for (int dx = -(radius - std::abs(dy)); dx <= radius - std::abs(dy); ++dx) image.set(cx + dx, cy + dy, colour);
}

// A critical point's marker by kind, dark outline and white inside so it reads on any basin.
void drawMarker(Image& image, int cx, int cy, solve::PointKind kind, int size) {
    const int r = size, inner = std::max(1, size - 2);
    switch (kind) {
        case solve::PointKind::Minimum:
            fillCircle(image, cx, cy, r, kInk);
            fillCircle(image, cx, cy, inner, kWhite);
            fillCircle(image, cx, cy, std::max(1, inner / 2), kInk);
            break;
        case solve::PointKind::Saddle:
            image.fillRect(cx - r, cy - r, 2 * r + 1, 2 * r + 1, kInk);
            image.fillRect(cx - inner, cy - inner, 2 * inner + 1, 2 * inner + 1, kWhite);
            for (int d = -inner; d <= inner; ++d) {
                image.set(cx + d, cy + d, kInk);
                image.set(cx + d, cy - d, kInk);
            }
            break;
        case solve::PointKind::Maximum:
            fillTriangle(image, cx, cy, r + 1, kInk);
            fillTriangle(image, cx, cy + 1, inner, kWhite);
            break;
        default:
            fillDiamond(image, cx, cy, r + 1, kInk);
            fillDiamond(image, cx, cy, inner, kWhite);
            break;
    }
}

std::string shortText(double v) {
    char buffer[32];
    std::snprintf(buffer, sizeof buffer, "%.3g", v);
    return buffer;
}

std::string pointLegend(const CriticalPoint& p, std::size_t index, const std::vector<std::string>& names) {
    std::string text = std::to_string(index) + " " + kindName(p);
    if (p.kind == solve::PointKind::Saddle) text += " " + std::to_string(p.index);
    if (p.continuum) text += " SET OF " + std::to_string(p.members);
    text += " (";
    for (Eigen::Index i = 0; i < p.x.size() && i < 3; ++i)
        text += (i ? ", " : "") + (static_cast<std::size_t>(i) < names.size() ? names[static_cast<std::size_t>(i)] : "X") +
                "=" + shortText(p.x[i]);
    if (p.x.size() > 3) text += ", ...";
    return text + ") F=" + shortText(p.value);
}

void putUint32(std::string& out, std::uint32_t v) {
    for (int shift = 24; shift >= 0; shift -= 8) out += static_cast<char>((v >> shift) & 0xFF);
}

void putChunk(std::string& out, const char* type, const std::string& data) {
    putUint32(out, static_cast<std::uint32_t>(data.size()));
    std::string typed = std::string(type, 4) + data;
    out += typed;
    putUint32(out, static_cast<std::uint32_t>(crc32(0L, reinterpret_cast<const Bytef*>(typed.data()),
                                                    static_cast<uInt>(typed.size()))));
}

}  // namespace

Image::Image(int w, int h, Rgb fill) : width(w), height(h) {
    if (w < 0 || h < 0 || static_cast<long long>(w) * h > 400'000'000LL)
        throw std::invalid_argument("an image of " + std::to_string(w) + " x " + std::to_string(h) +
                                    " pixels is out of range");
    rgb.resize(static_cast<std::size_t>(w) * static_cast<std::size_t>(h) * 3);
    for (std::size_t k = 0; k < rgb.size(); k += 3) {
        rgb[k] = fill.r;
        rgb[k + 1] = fill.g;
        rgb[k + 2] = fill.b;
    }
}

Rgb Image::at(int x, int y) const {
    const std::size_t k = (static_cast<std::size_t>(y) * static_cast<std::size_t>(width) + static_cast<std::size_t>(x)) * 3;
    return {rgb[k], rgb[k + 1], rgb[k + 2]};
}

void Image::set(int x, int y, Rgb c) {
    if (x < 0 || y < 0 || x >= width || y >= height) return;
    const std::size_t k = (static_cast<std::size_t>(y) * static_cast<std::size_t>(width) + static_cast<std::size_t>(x)) * 3;
    rgb[k] = c.r;
    rgb[k + 1] = c.g;
    rgb[k + 2] = c.b;
}

void Image::fillRect(int x, int y, int w, int h, Rgb c) {
    for (int j = std::max(0, y); j < std::min(height, y + h); ++j)
        for (int i = std::max(0, x); i < std::min(width, x + w); ++i) set(i, j, c);
}

Rgb pointColour(std::size_t pointIndex) {
    // Twelve hues picked for this program (neighbouring indices far apart in hue, none near
    // grey); beyond them golden-angle hue steps with alternating brightness.
    static constexpr Rgb kPalette[] = {{59, 111, 212}, {214, 69, 61},  {58, 166, 85},   {142, 82, 201},
                                       {227, 155, 45}, {43, 179, 192}, {208, 79, 160},  {155, 191, 58},
                                       {240, 212, 58}, {122, 90, 58},  {106, 208, 160}, {176, 160, 240}};
    if (pointIndex < std::size(kPalette)) return kPalette[pointIndex];
    return hsv(215.0 + 137.508 * static_cast<double>(pointIndex), 0.7, pointIndex % 2 ? 0.75 : 0.95);
}

Rgb codeColour(int code) {
    switch (code) {
        case kCellLimit:
            return {128, 128, 128};
        case kCellDiverged:
            return {28, 28, 28};
        case kCellFailed:
            return {200, 200, 200};
        case kCellOutside:
            return {250, 250, 250};
        case kCellNotRun:
            return {214, 222, 230};
        default:
            return code >= 0 ? pointColour(static_cast<std::size_t>(code)) : Rgb{255, 0, 255};
    }
}

Rgb cellColour(const BasinMap& map, long cell) {
    const int code = map.cells[static_cast<std::size_t>(cell)];
    const Rgb base = codeColour(code);
    if (code < 0 || map.maxIterations <= 0) return base;
    const double t = std::log1p(map.iterations[static_cast<std::size_t>(cell)]) / std::log1p(map.maxIterations);
    return scaled(base, 1.0 - 0.55 * std::clamp(t, 0.0, 1.0));
}

Image basinImage(const BasinSurvey& survey, std::size_t method) {
    const BasinMap& map = survey.maps.at(method);
    const int n = survey.grid;
    Image image(n, n);
    for (int j = 0; j < n; ++j)
        for (int i = 0; i < n; ++i) image.set(i, n - 1 - j, cellColour(map, static_cast<long>(j) * n + i));
    return image;
}

Image basinPicture(const BasinSurvey& survey, int panel) {
    panel = std::clamp(panel, 64, 4000);
    const int margin = 14, gap = 18, titleHeight = 34, footHeight = 16;
    const std::size_t count = std::max<std::size_t>(1, survey.maps.size());
    const int width = margin * 2 + static_cast<int>(count) * panel + static_cast<int>(count - 1) * gap;

    // Legend entries: every point, then the outcomes that are not a point and occur.
    struct Entry {
        Rgb colour;
        std::string text;
        int kind = -1;  // a PointKind for points
    };
    std::vector<Entry> entries;
    for (std::size_t k = 0; k < survey.map.points.size(); ++k)
        entries.push_back({pointColour(k), pointLegend(survey.map.points[k], k, survey.variables),
                           static_cast<int>(survey.map.points[k].kind)});
    for (int code : {kCellLimit, kCellDiverged, kCellFailed, kCellOutside, kCellNotRun}) {
        long total = 0;
        for (const BasinMap& m : survey.maps)
            total += code == kCellLimit ? m.limit : code == kCellDiverged ? m.diverged : code == kCellFailed ? m.failed
                                                  : code == kCellOutside  ? m.outside
                                                                          : m.notRun;
        if (total > 0) entries.push_back({codeColour(code), basinCodeName(code), -1});
    }
    int entryWidth = 0;
    for (const Entry& e : entries) entryWidth = std::max(entryWidth, 26 + textWidth(e.text, 1) + 18);
    const int columns = std::max(1, (width - 2 * margin) / std::max(1, entryWidth));
    const int rows = static_cast<int>((entries.size() + static_cast<std::size_t>(columns) - 1) / static_cast<std::size_t>(columns));
    const int legendTop = margin + titleHeight + panel + footHeight + 10;
    const int height = legendTop + rows * 16 + 26 + margin;

    Image image(width, height, kWhite);
    const int xv = survey.region.xVariable, yv = survey.region.yVariable;
    const int n = survey.grid;
    for (std::size_t m = 0; m < survey.maps.size(); ++m) {
        const BasinMap& map = survey.maps[m];
        const int left = margin + static_cast<int>(m) * (panel + gap), top = margin + titleHeight;
        std::string title = map.method.label;
        while (textWidth(title, 2) > panel && title.size() > 4) title = title.substr(0, title.size() - 4) + "...";
        drawText(image, left, margin, title, kInk, 2);
        long pointCells = 0;
        for (long c : map.pointCounts) pointCells += c;
        drawText(image, left, margin + 18,
                 std::to_string(pointCells) + " OF " + std::to_string(map.total()) + " RUNS END ON A POINT", kSubtleInk, 1);
        for (int py = 0; py < panel; ++py) {
            const int j = n - 1 - static_cast<int>(static_cast<long long>(py) * n / panel);
            for (int px = 0; px < panel; ++px) {
                const int i = static_cast<int>(static_cast<long long>(px) * n / panel);
                image.set(left + px, top + py, cellColour(map, static_cast<long>(j) * n + i));
            }
        }
        // Frame.
        image.fillRect(left - 1, top - 1, panel + 2, 1, kInk);
        image.fillRect(left - 1, top + panel, panel + 2, 1, kInk);
        image.fillRect(left - 1, top - 1, 1, panel + 2, kInk);
        image.fillRect(left + panel, top - 1, 1, panel + 2, kInk);
        // Critical points inside the plane's box.
        for (std::size_t k = 0; k < survey.map.points.size(); ++k) {
            const CriticalPoint& p = survey.map.points[k];
            const double u = (p.x[xv] - survey.region.lower[xv]) / survey.region.width(xv);
            const double v = (p.x[yv] - survey.region.lower[yv]) / survey.region.width(yv);
            if (u < 0 || u > 1 || v < 0 || v > 1) continue;
            const int cx = left + static_cast<int>(std::lround(u * (panel - 1)));
            const int cy = top + static_cast<int>(std::lround((1 - v) * (panel - 1)));
            drawMarker(image, cx, cy, p.kind, std::max(4, panel / 60));
        }
        const std::string axes = survey.variables.at(static_cast<std::size_t>(xv)) + " " +
                                 shortText(survey.region.lower[xv]) + " TO " + shortText(survey.region.upper[xv]) +
                                 ", " + survey.variables.at(static_cast<std::size_t>(yv)) + " " +
                                 shortText(survey.region.lower[yv]) + " TO " + shortText(survey.region.upper[yv]) + " (UP)";
        drawText(image, left, top + panel + 5, axes, kSubtleInk, 1);
    }
    for (std::size_t e = 0; e < entries.size(); ++e) {
        const int column = static_cast<int>(e) % columns, row = static_cast<int>(e) / columns;
        const int x = margin + column * entryWidth, y = legendTop + row * 16;
        image.fillRect(x, y, 20, 11, kInk);
        image.fillRect(x + 1, y + 1, 18, 9, entries[e].colour);
        if (entries[e].kind >= 0) drawMarker(image, x + 10, y + 5, static_cast<solve::PointKind>(entries[e].kind), 3);
        drawText(image, x + 26, y + 2, entries[e].text, kInk, 1);
    }
    drawText(image, margin, legendTop + rows * 16 + 8,
             "DARKER: MORE ITERATIONS. GREYS: RUNS THAT END ON NO CRITICAL POINT OF THE BOX.", kSubtleInk, 1);
    return image;
}

std::string encodePng(const Image& image) {
    if (image.width < 1 || image.height < 1) throw std::invalid_argument("cannot encode an empty image as PNG");
    std::string raw;
    const std::size_t rowBytes = static_cast<std::size_t>(image.width) * 3;
    raw.reserve((rowBytes + 1) * static_cast<std::size_t>(image.height));
    for (int y = 0; y < image.height; ++y) {
        raw += '\0';  // filter type 0 (none)
        raw.append(reinterpret_cast<const char*>(image.rgb.data()) + static_cast<std::size_t>(y) * rowBytes, rowBytes);
    }
    uLongf compressedSize = compressBound(static_cast<uLong>(raw.size()));
    std::string compressed(compressedSize, '\0');
    if (compress2(reinterpret_cast<Bytef*>(compressed.data()), &compressedSize, reinterpret_cast<const Bytef*>(raw.data()),
                  static_cast<uLong>(raw.size()), 6) != Z_OK)
        throw std::runtime_error("zlib could not compress the image");
    compressed.resize(compressedSize);

    std::string png("\x89PNG\r\n\x1a\n", 8);
    std::string header;
    putUint32(header, static_cast<std::uint32_t>(image.width));
    putUint32(header, static_cast<std::uint32_t>(image.height));
    header += static_cast<char>(8);  // bit depth
    header += static_cast<char>(2);  // colour type: RGB
    header += '\0';                  // compression: deflate
    header += '\0';                  // filter method 0
    header += '\0';                  // no interlace
    putChunk(png, "IHDR", header);
    putChunk(png, "IDAT", compressed);
    putChunk(png, "IEND", "");
    return png;
}

void writePng(const Image& image, const std::string& path) {
    const std::string bytes = encodePng(image);
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    if (!out) throw std::runtime_error("cannot open '" + path + "' for writing");
    out.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
    out.close();
    if (!out) throw std::runtime_error("cannot write '" + path + "'");
}

}  // namespace sw::survey
