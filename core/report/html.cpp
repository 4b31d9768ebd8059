// The review report as one HTML5 file (see html.h).
#include "core/report/html.h"

#include <cctype>
#include <cmath>
#include <cstdio>
#include <string_view>

namespace sw::report {

namespace {

// Light, printable, no external fonts: the system's own faces in order of preference.
const char* kStyle = R"css(
:root { color-scheme: light; --ink: #1d2125; --muted: #5a6470; --rule: #d5dae0; --panel: #f5f7f9;
        --accent: #2d4f7c; --caution: #9a5b00; --caution-bg: #fff6e6; --warning: #a3261d; --warning-bg: #fdeeed; }
* { box-sizing: border-box; }
html { background: #ffffff; }
body { margin: 0; color: var(--ink); background: #ffffff;
       font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", "DejaVu Sans", Arial, sans-serif; }
main { max-width: 980px; margin: 0 auto; padding: 28px 32px 48px; }
header.report { border-bottom: 3px solid var(--accent); padding-bottom: 12px; margin-bottom: 18px; }
header.report .kind { text-transform: uppercase; letter-spacing: .08em; font-size: 12px; color: var(--accent); font-weight: 600; }
h1 { font-size: 28px; line-height: 1.2; margin: 4px 0 6px; }
header.report .subtitle { color: var(--muted); font-size: 13px; }
nav.contents { font-size: 13px; color: var(--muted); margin: 0 0 18px; }
nav.contents ol { margin: 4px 0 0; padding: 0; list-style: none; columns: 3; column-gap: 24px; }
nav.contents a { color: var(--accent); text-decoration: none; }
h2 { font-size: 20px; margin: 30px 0 10px; padding-bottom: 4px; border-bottom: 1px solid var(--rule); color: var(--accent); }
h3 { font-size: 15px; margin: 18px 0 6px; }
p { margin: 6px 0 10px; }
code, pre, .code { font-family: ui-monospace, "DejaVu Sans Mono", "Liberation Mono", Menlo, Consolas, monospace; font-size: 13px; }
code { background: var(--panel); padding: 0 3px; border-radius: 3px; overflow-wrap: anywhere; }
td code { overflow-wrap: normal; }
pre { background: var(--panel); border: 1px solid var(--rule); border-radius: 4px; padding: 8px 10px;
      white-space: pre-wrap; overflow-wrap: anywhere; margin: 6px 0 12px; }
dl.fields { display: grid; grid-template-columns: max-content 1fr; gap: 3px 16px; margin: 6px 0 12px; }
dl.fields dt { color: var(--muted); }
dl.fields dd { margin: 0; overflow-wrap: anywhere; }
.table-wrap { overflow-x: auto; margin: 6px 0 14px; }
table { border-collapse: collapse; font-size: 13.5px; }
table.compact { font-size: 12px; }
th, td { border-bottom: 1px solid var(--rule); padding: 4px 10px 4px 0; text-align: left; vertical-align: top; }
th { font-weight: 600; border-bottom: 2px solid var(--ink); white-space: nowrap; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; padding-left: 10px; }
tbody tr:nth-child(even) td { background: #fafbfc; }
.swatch { display: inline-block; width: 10px; height: 10px; border-radius: 2px; margin-right: 6px;
          vertical-align: baseline; print-color-adjust: exact; -webkit-print-color-adjust: exact; }
figure { margin: 14px 0 20px; padding: 10px; border: 1px solid var(--rule); border-radius: 4px; background: #ffffff; }
figure .figure-title { font-weight: 600; margin: 0 0 6px; }
figure svg { display: block; width: 100%; height: auto; margin: 0 auto; }
figcaption { color: var(--muted); font-size: 13px; margin-top: 6px; }
aside { border-left: 4px solid var(--accent); background: var(--panel); padding: 8px 12px; margin: 10px 0 14px; border-radius: 0 4px 4px 0; }
aside.caution { border-color: var(--caution); background: var(--caution-bg); }
aside.warning { border-color: var(--warning); background: var(--warning-bg); }
ul { margin: 6px 0 12px; padding-left: 22px; }
li { margin: 2px 0; }
@page { size: A4; margin: 16mm 14mm 18mm;
        @bottom-left { content: "%FOOTER%"; font: 8pt sans-serif; color: #5a6470; }
        @bottom-right { content: "page " counter(page) " of " counter(pages); font: 8pt sans-serif; color: #5a6470; } }
@media print {
  body { font-size: 10.5pt; }
  main { max-width: none; padding: 0; }
  nav.contents ol { columns: 3; }
  h2 { break-after: avoid; page-break-after: avoid; }
  h3 { break-after: avoid; page-break-after: avoid; }
  figure, aside, tr, dl.fields, pre { break-inside: avoid; page-break-inside: avoid; }
  thead { display: table-header-group; }
  .table-wrap { overflow: visible; }
  a { color: inherit; text-decoration: none; }
}
)css";

void appendEscaped(std::string& out, std::string_view text) {
    for (char c : text) {
        switch (c) {
        case '&': out += "&amp;"; break;
        case '<': out += "&lt;"; break;
        case '>': out += "&gt;"; break;
        case '"': out += "&quot;"; break;
        case '\'': out += "&#39;"; break;
        default: out += c;
        }
    }
}

// A CSS string literal's content (for the page footer).
std::string cssString(const std::string& text) {
    std::string s;
    for (char c : text) {
        if (c == '"' || c == '\\') s += '\\';
        if (c == '\n') {
            s += ' ';
            continue;
        }
        if (c == '<') {
            s += "\\3c ";  // never "</style>" inside the style element
            continue;
        }
        s += c;
    }
    return s;
}

std::string pixels(double v) {
    char buffer[32];
    std::snprintf(buffer, sizeof buffer, "%.0f", std::round(v));
    return buffer;
}

void writeText(std::string& out, const Text& text) {
    for (const Span& span : text) {
        if (!span.swatch.empty()) {
            out += "<span class=\"swatch\" style=\"background:";
            appendEscaped(out, span.swatch);
            out += "\"></span>";
        }
        const char* tag = nullptr;
        switch (span.style) {
        case Span::Style::Code: tag = "code"; break;
        case Span::Style::Strong: tag = "strong"; break;
        case Span::Style::Emphasis: tag = "em"; break;
        case Span::Style::Plain: break;
        }
        if (tag) out += std::string("<") + tag + ">";
        appendEscaped(out, span.text);
        if (tag) out += std::string("</") + tag + ">";
    }
}

void writeTable(std::string& out, const Table& t) {
    out += "<div class=\"table-wrap\"><table";
    if (t.compact) out += " class=\"compact\"";
    out += ">\n<thead><tr>";
    // A column is numeric when every body cell in it is.
    std::vector<bool> numeric(t.header.size(), !t.rows.empty());
    for (const auto& row : t.rows)
        for (std::size_t c = 0; c < numeric.size(); ++c)
            if (c >= row.size() || !row[c].numeric) numeric[c] = false;
    for (std::size_t c = 0; c < t.header.size(); ++c) {
        out += numeric[c] ? "<th class=\"num\">" : "<th>";
        appendEscaped(out, t.header[c]);
        out += "</th>";
    }
    out += "</tr></thead>\n<tbody>\n";
    for (const auto& row : t.rows) {
        out += "<tr>";
        for (const Cell& c : row) {
            out += c.numeric ? "<td class=\"num\">" : "<td>";
            writeText(out, c.text);
            out += "</td>";
        }
        out += "</tr>\n";
    }
    out += "</tbody></table></div>\n";
}

void writeBlock(std::string& out, const Block& b) {
    switch (b.kind) {
    case Block::Kind::Heading:
        out += "<h3>";
        writeText(out, b.text);
        out += "</h3>\n";
        break;
    case Block::Kind::Paragraph:
        out += "<p>";
        writeText(out, b.text);
        out += "</p>\n";
        break;
    case Block::Kind::Fields:
        out += "<dl class=\"fields\">\n";
        for (const Field& f : b.fields) {
            out += "<dt>";
            appendEscaped(out, f.label);
            out += "</dt><dd>";
            writeText(out, f.value);
            out += "</dd>\n";
        }
        out += "</dl>\n";
        break;
    case Block::Kind::Table: writeTable(out, b.table); break;
    case Block::Kind::Preformatted:
        out += "<pre>";
        appendEscaped(out, b.preformatted);
        out += "</pre>\n";
        break;
    case Block::Kind::Figure: {
        const Figure& f = b.figure;
        out += "<figure id=\"";
        appendEscaped(out, f.id);
        out += "\">\n<div class=\"figure-title\">";
        appendEscaped(out, f.title);
        out += "</div>\n";
        out += inlineSvg(f.svg, f.id, f.width, f.height, f.title);
        out += "\n<figcaption>";
        appendEscaped(out, f.caption);
        out += "</figcaption>\n</figure>\n";
        break;
    }
    case Block::Kind::Callout:
        out += "<aside class=\"";
        appendEscaped(out, b.tone.empty() ? std::string("note") : b.tone);
        out += "\">";
        writeText(out, b.text);
        out += "</aside>\n";
        break;
    case Block::Kind::List:
        out += "<ul>\n";
        for (const Text& item : b.items) {
            out += "<li>";
            writeText(out, item);
            out += "</li>\n";
        }
        out += "</ul>\n";
        break;
    }
}

// The value of attribute `name` inside one start tag, or "".
std::string attribute(std::string_view tag, std::string_view name) {
    std::size_t at = 0;
    while ((at = tag.find(name, at)) != std::string_view::npos) {
        const bool startsWord = at > 0 && (tag[at - 1] == ' ' || tag[at - 1] == '\n' || tag[at - 1] == '\t');
        const std::size_t eq = at + name.size();
        if (startsWord && eq + 1 < tag.size() && tag[eq] == '=' && (tag[eq + 1] == '"' || tag[eq + 1] == '\'')) {
            const char quote = tag[eq + 1];
            const std::size_t end = tag.find(quote, eq + 2);
            if (end == std::string_view::npos) return {};
            return std::string(tag.substr(eq + 2, end - eq - 2));
        }
        at = eq;
    }
    return {};
}

// Drops the first <NAME ...>...</NAME> element (QSvgGenerator's own title and description).
void dropFirstElement(std::string& body, const std::string& name) {
    const std::size_t open = body.find("<" + name);
    if (open == std::string::npos) return;
    const std::size_t close = body.find("</" + name + ">", open);
    if (close == std::string::npos) return;
    body.erase(open, close + name.size() + 3 - open);
}

// Prefixes every id="X", url(#X) and href="#X" (also xlink:href) in the body.
std::string prefixIds(const std::string& body, const std::string& prefix) {
    std::string out;
    out.reserve(body.size() + 256);
    std::size_t i = 0;
    const std::size_t n = body.size();
    auto startsAt = [&](std::size_t at, std::string_view what) { return body.compare(at, what.size(), what) == 0; };
    while (i < n) {
        const char c = body[i];
        if ((c == ' ' || c == '\n' || c == '\t') && startsAt(i + 1, "id=\"")) {
            out += body.substr(i, 5);
            out += prefix + "-";
            i += 5;
            continue;
        }
        if (c == 'u' && startsAt(i, "url(#")) {
            out += "url(#" + prefix + "-";
            i += 5;
            continue;
        }
        if (c == 'h' && startsAt(i, "href=\"#")) {
            out += "href=\"#" + prefix + "-";
            i += 7;
            continue;
        }
        out += c;
        ++i;
    }
    return out;
}

// Font families as Qt names them (fontconfig's aliases "Sans Serif", "Monospace", or a real
// family) made into lists a browser on any system resolves: the alias becomes the CSS generic
// family, a real family gets the generic one after it.
std::string browserFonts(const std::string& body) {
    static const std::string key = "font-family=\"";
    std::string out;
    out.reserve(body.size());
    std::size_t at = 0;
    while (true) {
        const std::size_t found = body.find(key, at);
        if (found == std::string::npos) break;
        const std::size_t start = found + key.size();
        const std::size_t end = body.find('"', start);
        if (end == std::string::npos) break;
        std::string family = body.substr(start, end - start);
        std::string lowered;
        for (char c : family) lowered += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
        if (lowered == "sans serif" || lowered == "sans" || lowered == "sans-serif")
            family = "sans-serif";
        else if (lowered == "monospace" || lowered == "mono")
            family = "monospace";
        else if (lowered == "serif")
            family = "serif";
        else if (lowered.find("sans-serif") == std::string::npos && lowered.find("monospace") == std::string::npos)
            family += ", sans-serif";
        out.append(body, at, start - at);
        out += family;
        at = end;
    }
    out.append(body, at, std::string::npos);
    return out;
}

}  // namespace

std::string escapeHtml(const std::string& text) {
    std::string out;
    appendEscaped(out, text);
    return out;
}

std::string inlineSvg(const std::string& svg, const std::string& idPrefix, double width, double height,
                      const std::string& title) {
    std::size_t open = svg.find("<svg");
    while (open != std::string::npos && open + 4 < svg.size() && svg[open + 4] != ' ' && svg[open + 4] != '\n' &&
           svg[open + 4] != '\t' && svg[open + 4] != '>')
        open = svg.find("<svg", open + 4);
    if (open == std::string::npos) return {};
    const std::size_t tagEnd = svg.find('>', open);
    const std::size_t close = svg.rfind("</svg>");
    if (tagEnd == std::string::npos || close == std::string::npos || close < tagEnd) return {};
    const std::string_view tag(svg.data() + open, tagEnd - open);
    std::string viewBox = attribute(tag, "viewBox");
    if (viewBox.empty()) viewBox = "0 0 " + pixels(width) + " " + pixels(height);
    std::string body = svg.substr(tagEnd + 1, close - tagEnd - 1);
    dropFirstElement(body, "title");
    dropFirstElement(body, "desc");
    body = browserFonts(prefixIds(body, idPrefix));

    std::string out = "<svg xmlns=\"http://www.w3.org/2000/svg\" xmlns:xlink=\"http://www.w3.org/1999/xlink\" viewBox=\"";
    appendEscaped(out, viewBox);
    out += "\" width=\"" + pixels(width) + "\" height=\"" + pixels(height) + "\" role=\"img\" aria-labelledby=\"";
    appendEscaped(out, idPrefix);
    out += "-title\"><title id=\"";
    appendEscaped(out, idPrefix);
    out += "-title\">";
    appendEscaped(out, title);
    out += "</title>";
    out += body;
    out += "</svg>";
    return out;
}

std::string toHtml(const Document& d) {
    std::string out;
    out.reserve(1 << 20);
    out += "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n";
    out += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n";
    out += "<meta name=\"generator\" content=\"Saddlewise\">\n<title>";
    appendEscaped(out, d.title.empty() ? std::string("Review report") : d.title);
    out += "</title>\n<style>";
    std::string style = kStyle;
    const std::string marker = "%FOOTER%";
    style.replace(style.find(marker), marker.size(), cssString(d.footer));
    out += style;
    out += "</style>\n</head>\n<body>\n<main>\n<header class=\"report\">\n<div class=\"kind\">Review report</div>\n<h1>";
    appendEscaped(out, d.title);
    out += "</h1>\n<div class=\"subtitle\">";
    appendEscaped(out, d.subtitle);
    out += "</div>\n</header>\n";

    out += "<nav class=\"contents\" aria-label=\"Contents\">Contents<ol>\n";
    for (const Section& s : d.sections) {
        out += "<li><a href=\"#";
        appendEscaped(out, s.id);
        out += "\">";
        appendEscaped(out, s.title);
        out += "</a></li>\n";
    }
    out += "</ol></nav>\n";

    for (const Section& s : d.sections) {
        out += "<section id=\"";
        appendEscaped(out, s.id);
        out += "\">\n<h2>";
        appendEscaped(out, s.title);
        out += "</h2>\n";
        for (const Block& b : s.blocks) writeBlock(out, b);
        out += "</section>\n";
    }
    out += "</main>\n";
    if (!d.machineReadable.empty()) {
        // '<' only occurs inside JSON strings, where \u003c is the same character: the
        // element can never be closed early by the data.
        std::string json;
        json.reserve(d.machineReadable.size());
        for (char c : d.machineReadable) {
            if (c == '<')
                json += "\\u003c";
            else
                json += c;
        }
        out += "<script type=\"application/json\" id=\"saddlewise-results\">\n" + json + "\n</script>\n";
    }
    out += "</body>\n</html>\n";
    return out;
}

}  // namespace sw::report
