#include "core/report/document.h"

#include <utility>

namespace sw::report {

Span plain(std::string text) { return {std::move(text), Span::Style::Plain, {}}; }
Span code(std::string text) { return {std::move(text), Span::Style::Code, {}}; }
Span strong(std::string text) { return {std::move(text), Span::Style::Strong, {}}; }
Span emphasis(std::string text) { return {std::move(text), Span::Style::Emphasis, {}}; }
Span swatch(std::string colour, std::string text) { return {std::move(text), Span::Style::Plain, std::move(colour)}; }

std::string plainText(const Text& text) {
    std::string s;
    for (const Span& span : text) s += span.text;
    return s;
}

Cell cell(std::string text) { return {{plain(std::move(text))}, false}; }
Cell numberCell(std::string text) { return {{plain(std::move(text))}, true}; }
Cell codeCell(std::string text) { return {{code(std::move(text))}, false}; }

Block heading(std::string text) {
    Block b;
    b.kind = Block::Kind::Heading;
    b.text = {plain(std::move(text))};
    return b;
}

Block paragraph(Text text) {
    Block b;
    b.kind = Block::Kind::Paragraph;
    b.text = std::move(text);
    return b;
}

Block paragraph(std::string text) { return paragraph(Text{plain(std::move(text))}); }

Block fields(std::vector<Field> list) {
    Block b;
    b.kind = Block::Kind::Fields;
    b.fields = std::move(list);
    return b;
}

Block table(Table t) {
    Block b;
    b.kind = Block::Kind::Table;
    b.table = std::move(t);
    return b;
}

Block preformatted(std::string text) {
    Block b;
    b.kind = Block::Kind::Preformatted;
    b.preformatted = std::move(text);
    return b;
}

Block figure(Figure f) {
    Block b;
    b.kind = Block::Kind::Figure;
    b.figure = std::move(f);
    return b;
}

Block callout(std::string tone, Text text) {
    Block b;
    b.kind = Block::Kind::Callout;
    b.tone = std::move(tone);
    b.text = std::move(text);
    return b;
}

Block list(std::vector<Text> items) {
    Block b;
    b.kind = Block::Kind::List;
    b.items = std::move(items);
    return b;
}

const Section* Document::section(const std::string& id) const {
    for (const Section& s : sections)
        if (s.id == id) return &s;
    return nullptr;
}

}  // namespace sw::report
