#include "widgets/theme.h"

#include <algorithm>
#include <array>
#include <cmath>

namespace sw::widgets {

// The lineup palette is our own. It was chosen by a small search that maximised the
// smallest pairwise CIELAB difference (ΔE*ab) over normal vision, protanopia and
// deuteranopia (simulated with the Machado, Oliveira & Fernandes (2009) matrices at
// severity 1.0), keeping CIE lightness L* within 32..72 so every colour reads on a white
// plot background and stands apart from pale field colours. Measured minimum ΔE*ab between
// any two colours (tests/gui/theme_test.cpp pins these):
//   normal 35.9, protanopia 28.2, deuteranopia 28.2, tritanopia 9.9.
// Tritanopia is weaker (cerulean vs teal); markers carry the difference there.
//
//   #002ddd deep blue     #f87855 coral        #12a0c9 cerulean     #f4056e raspberry
//   #00bbab teal          #ff970a amber        #005834 forest green #b862ff violet
std::vector<QColor> lineupPalette() {
    return {QColor(0x00, 0x2d, 0xdd), QColor(0xf8, 0x78, 0x55), QColor(0x12, 0xa0, 0xc9), QColor(0xf4, 0x05, 0x6e),
            QColor(0x00, 0xbb, 0xab), QColor(0xff, 0x97, 0x0a), QColor(0x00, 0x58, 0x34), QColor(0xb8, 0x62, 0xff)};
}

QColor lineupColour(int index) {
    static const std::vector<QColor> palette = lineupPalette();
    const int n = static_cast<int>(palette.size());
    return palette[static_cast<std::size_t>(((index % n) + n) % n)];
}

std::vector<Marker> lineupMarkers() {
    return {Marker::Circle, Marker::Square, Marker::Triangle, Marker::Diamond,
            Marker::Cross,  Marker::Plus,   Marker::Star};
}

Marker lineupMarker(int index) {
    static const std::vector<Marker> markers = lineupMarkers();
    const int n = static_cast<int>(markers.size());
    return markers[static_cast<std::size_t>(((index % n) + n) % n)];
}

QString markerName(Marker marker) {
    switch (marker) {
    case Marker::Circle: return "circle";
    case Marker::Square: return "square";
    case Marker::Triangle: return "triangle";
    case Marker::Diamond: return "diamond";
    case Marker::Cross: return "cross";
    case Marker::Plus: return "plus";
    case Marker::Star: return "star";
    }
    return "circle";
}

Marker markerFromName(const QString& name, bool* ok) {
    for (Marker m : lineupMarkers()) {
        if (markerName(m) == name) {
            if (ok) *ok = true;
            return m;
        }
    }
    if (ok) *ok = false;
    return Marker::Circle;
}

QColor problemTextColour(const QPalette& palette) {
    const bool dark = palette.color(QPalette::Window).lightness() < 128;
    return dark ? QColor(0xff, 0x8a, 0x80) : QColor(0xb0, 0x10, 0x10);
}

QString problemTextStyle(const QPalette& palette) {
    return QStringLiteral("color: %1;").arg(problemTextColour(palette).name());
}

namespace {

double toLinear(double c) { return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4); }
double toGamma(double c) { return c <= 0.0031308 ? 12.92 * c : 1.055 * std::pow(c, 1.0 / 2.4) - 0.055; }

using Rgb = std::array<double, 3>;
using Matrix3 = std::array<std::array<double, 3>, 3>;

Rgb linearRgb(const QColor& c) { return {toLinear(c.redF()), toLinear(c.greenF()), toLinear(c.blueF())}; }

// Machado, Oliveira & Fernandes, "A Physiologically-based Model for Simulation of Color
// Vision Deficiency", IEEE TVCG 15(6), 2009: severity 1.0 matrices, applied to linear RGB
// (values from memory of the paper's table).
const Matrix3 kProtanopia = {{{0.152286, 1.052583, -0.204868}, {0.114503, 0.786281, 0.099216}, {-0.003882, -0.048116, 1.051998}}};
const Matrix3 kDeuteranopia = {{{0.367322, 0.860646, -0.227968}, {0.280085, 0.672501, 0.047413}, {-0.011820, 0.042940, 0.968881}}};
const Matrix3 kTritanopia = {{{1.255528, -0.076749, -0.178779}, {-0.078411, 0.930809, 0.147602}, {0.004733, 0.691367, 0.303900}}};

std::array<double, 3> labOfLinear(const Rgb& rgb) {
    // sRGB (D65) -> XYZ -> L*a*b*, CIE 1976.
    const double x = 0.4124 * rgb[0] + 0.3576 * rgb[1] + 0.1805 * rgb[2];
    const double y = 0.2126 * rgb[0] + 0.7152 * rgb[1] + 0.0722 * rgb[2];
    const double z = 0.0193 * rgb[0] + 0.1192 * rgb[1] + 0.9505 * rgb[2];
    auto f = [](double t) { return t > 0.008856 ? std::cbrt(t) : 7.787 * t + 16.0 / 116.0; };
    const double fx = f(x / 0.95047), fy = f(y), fz = f(z / 1.08883);
    return {116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)};
}

}  // namespace

QColor simulateColourVision(const QColor& colour, ColourVision vision) {
    const Matrix3* m = nullptr;
    switch (vision) {
    case ColourVision::Normal: return colour;
    case ColourVision::Protanopia: m = &kProtanopia; break;
    case ColourVision::Deuteranopia: m = &kDeuteranopia; break;
    case ColourVision::Tritanopia: m = &kTritanopia; break;
    }
    const Rgb in = linearRgb(colour);
    Rgb out{};
    for (int i = 0; i < 3; ++i) {
        double v = 0;
        for (int j = 0; j < 3; ++j) v += (*m)[i][j] * in[j];
        out[i] = std::clamp(toGamma(std::clamp(v, 0.0, 1.0)), 0.0, 1.0);
    }
    return QColor::fromRgbF(static_cast<float>(out[0]), static_cast<float>(out[1]), static_cast<float>(out[2]));
}

double colourDifference(const QColor& a, const QColor& b) {
    const auto la = labOfLinear(linearRgb(a)), lb = labOfLinear(linearRgb(b));
    return std::sqrt((la[0] - lb[0]) * (la[0] - lb[0]) + (la[1] - lb[1]) * (la[1] - lb[1]) +
                     (la[2] - lb[2]) * (la[2] - lb[2]));
}

Lab cielab(const QColor& colour) {
    const auto lab = labOfLinear(linearRgb(colour));
    return {lab[0], lab[1], lab[2]};
}

// CIEDE2000, written from Sharma, Wu & Dalal (2005), eqs. (1)-(17), with their notes on the
// hue angle and its mean when a chroma is zero.
double ciede2000(const Lab& first, const Lab& second) {
    constexpr double kPi = 3.14159265358979323846;
    auto radians = [](double degrees) { return degrees * kPi / 180.0; };
    auto degrees = [](double r) { return r * 180.0 / kPi; };
    const double c1 = std::hypot(first.a, first.b), c2 = std::hypot(second.a, second.b);
    const double meanC = (c1 + c2) / 2;
    const double meanC7 = std::pow(meanC, 7);
    const double g = 0.5 * (1 - std::sqrt(meanC7 / (meanC7 + std::pow(25.0, 7))));
    const double a1 = (1 + g) * first.a, a2 = (1 + g) * second.a;
    const double cp1 = std::hypot(a1, first.b), cp2 = std::hypot(a2, second.b);
    auto hue = [&](double a, double b) {
        if (a == 0 && b == 0) return 0.0;
        const double h = degrees(std::atan2(b, a));
        return h < 0 ? h + 360 : h;
    };
    const double h1 = hue(a1, first.b), h2 = hue(a2, second.b);
    const double dL = second.L - first.L, dC = cp2 - cp1;
    double dh = 0;
    if (cp1 * cp2 != 0) {
        dh = h2 - h1;
        if (dh > 180) dh -= 360;
        else if (dh < -180) dh += 360;
    }
    const double dH = 2 * std::sqrt(cp1 * cp2) * std::sin(radians(dh / 2));
    const double meanL = (first.L + second.L) / 2, meanCp = (cp1 + cp2) / 2;
    double meanH = h1 + h2;
    if (cp1 * cp2 != 0) {
        if (std::abs(h1 - h2) <= 180) meanH = (h1 + h2) / 2;
        else if (h1 + h2 < 360) meanH = (h1 + h2 + 360) / 2;
        else meanH = (h1 + h2 - 360) / 2;
    }
    const double t = 1 - 0.17 * std::cos(radians(meanH - 30)) + 0.24 * std::cos(radians(2 * meanH)) +
                     0.32 * std::cos(radians(3 * meanH + 6)) - 0.20 * std::cos(radians(4 * meanH - 63));
    const double dTheta = 30 * std::exp(-std::pow((meanH - 275) / 25, 2));
    const double meanCp7 = std::pow(meanCp, 7);
    const double rc = 2 * std::sqrt(meanCp7 / (meanCp7 + std::pow(25.0, 7)));
    const double l50 = (meanL - 50) * (meanL - 50);
    const double sl = 1 + 0.015 * l50 / std::sqrt(20 + l50);
    const double sc = 1 + 0.045 * meanCp, sh = 1 + 0.015 * meanCp * t;
    const double rt = -std::sin(radians(2 * dTheta)) * rc;
    const double l = dL / sl, c = dC / sc, h = dH / sh;
    return std::sqrt(l * l + c * c + h * h + rt * c * h);
}

double colourDifference2000(const QColor& a, const QColor& b) { return ciede2000(cielab(a), cielab(b)); }

}  // namespace sw::widgets
