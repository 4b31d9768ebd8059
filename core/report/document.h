#pragma once
// The review report as a plain document: sections of blocks (paragraphs, label/value fields,
// tables, preformatted text, figures, callouts). report.h fills one from a study's runs;
// html.h writes it as one self-contained HTML file, and the app layer lays the same document
// out as a paginated PDF (app/report/pdf.h). Both formats draw from this one structure, so
// they always hold the same content.
//
// Text is plain UTF-8 (writers escape it); styling is a handful of span styles, never markup.

#include <string>
#include <vector>

namespace sw::report {

struct Span {
    enum class Style { Plain, Code, Strong, Emphasis };
    std::string text;
    Style style = Style::Plain;
    std::string swatch;  // "#rrggbb": a small square in this colour before the text (a method's colour)
};
using Text = std::vector<Span>;

// Shorthands for building text.
Span plain(std::string text);
Span code(std::string text);
Span strong(std::string text);
Span emphasis(std::string text);
Span swatch(std::string colour, std::string text);
// The text without styles (for tests and the PDF's outline).
std::string plainText(const Text& text);

struct Field {
    std::string label;
    Text value;
};

struct Cell {
    Text text;
    bool numeric = false;  // right-aligned, tabular figures
};
Cell cell(std::string text);
Cell numberCell(std::string text);
Cell codeCell(std::string text);

struct Table {
    std::vector<std::string> header;
    std::vector<std::vector<Cell>> rows;
    bool compact = false;  // smaller type (wide tables: the data preview, correlations)
};

// A figure: SVG text drawn by the window's views (app/report/figures.h). width and height are
// its size in CSS pixels (1/96 inch); the SVG scales to the page width when narrower.
struct Figure {
    std::string id;  // unique in the document; SVG ids inside are prefixed with it
    std::string title;
    std::string caption;
    std::string svg;
    double width = 0, height = 0;
};

struct Block {
    enum class Kind { Heading, Paragraph, Fields, Table, Preformatted, Figure, Callout, List };
    Kind kind = Kind::Paragraph;
    Text text;                 // Heading (a sub-heading), Paragraph, Callout
    std::string preformatted;  // Preformatted: kept as is, in a monospace face
    std::vector<Field> fields;
    Table table;
    Figure figure;
    std::vector<Text> items;  // List
    std::string tone;         // Callout: "caution" or "warning" or "note"
};

Block heading(std::string text);
Block paragraph(Text text);
Block paragraph(std::string text);
Block fields(std::vector<Field> fields);
Block table(Table table);
Block preformatted(std::string text);
Block figure(Figure figure);
Block callout(std::string tone, Text text);
Block list(std::vector<Text> items);

struct Section {
    std::string id;  // stable anchor, e.g. "end-points" (tests look for these)
    std::string title;
    std::vector<Block> blocks;
};

struct Document {
    std::string title;     // the study's title
    std::string subtitle;  // "Review report · Saddlewise 0.1.0 · 2025-01-31 14:02 UTC"
    std::string footer;    // one line for the PDF's page footers
    std::vector<Section> sections;
    std::string machineReadable;  // JSON embedded in the HTML for tools (not shown; "" for none)

    const Section* section(const std::string& id) const;
};

}  // namespace sw::report
