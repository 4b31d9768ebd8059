#pragma once
// The review report laid out as a PDF: A4, the same Document as the HTML (core/report/
// document.h), built as a QTextDocument through QTextCursor (not through Qt's HTML subset) and
// paginated by hand so every page carries a footer with the report's title and "page i of n".
// Figures are the same SVG as in the HTML, drawn as vectors by QSvgRenderer; each sits with
// its title and caption in one block that Qt's layout never splits across pages, a heading
// never ends a page, and a table row never straddles two (the table is cut before it and goes
// on overleaf under its header again).
//
// Needs a QGuiApplication (fonts). Any thread: the text document, the PDF writer and the SVG
// renderer are used by this call alone.

#include "core/report/document.h"

#include <string>
#include <utility>
#include <vector>

namespace sw::reportgui {

// The PDF's bytes; throws std::runtime_error with a sentence when Qt cannot produce it.
std::string writePdf(const report::Document& document);

// For tests: the pages (0-based) that the top and the bottom of every data-table row fall on,
// as writePdf lays the document out.
std::vector<std::pair<int, int>> pdfTableRowPages(const report::Document& document);

}  // namespace sw::reportgui
