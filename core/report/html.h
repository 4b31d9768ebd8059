#pragma once
// The review report as one self-contained HTML5 file: styles inline in <style>, figures as
// inline <svg> (their raster parts, such as a landscape's filled field, as data: URIs inside
// the SVG), no executable script (the results ride along as a JSON data block), no links out
// of the file. Light, readable on screen, and laid out for
// print (A4 page margins with page numbers, figures and table rows kept whole).

#include "core/report/document.h"

#include <string>

namespace sw::report {

std::string toHtml(const Document& document);

// Text escaped for HTML element content and attribute values.
std::string escapeHtml(const std::string& text);

// An SVG document (as QSvgGenerator writes it) made ready to sit inside HTML: the XML
// declaration and doctype dropped, the root element given a viewBox, a size in CSS pixels and
// an accessible title, and every id (and every reference to one) prefixed with `idPrefix`, so
// several figures in one page never resolve each other's clip paths or gradients. Font families
// get a CSS generic family ("Sans Serif", fontconfig's alias, becomes sans-serif), so a browser
// on any system finds a face. Returns "" when the text holds no <svg> element.
std::string inlineSvg(const std::string& svg, const std::string& idPrefix, double width, double height,
                      const std::string& title);

}  // namespace sw::report
