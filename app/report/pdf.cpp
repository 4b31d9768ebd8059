// The review report as a paginated PDF (see pdf.h).
#include "app/report/pdf.h"

#include <QAbstractTextDocumentLayout>
#include <QBuffer>
#include <QFontDatabase>
#include <QFontMetricsF>
#include <QGuiApplication>
#include <QPageLayout>
#include <QPageSize>
#include <QPainter>
#include <QPdfWriter>
#include <QSvgRenderer>
#include <QTextBlock>
#include <QTextCursor>
#include <QTextDocument>
#include <QTextFrame>
#include <QTextList>
#include <QTextObjectInterface>
#include <QTextTable>
#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <memory>
#include <set>
#include <stdexcept>

namespace sw::reportgui {

namespace {

// The PDF's coordinates are CSS pixels (96 per inch), so the figures' sizes and the HTML's
// measures mean the same here; text and figures stay vectors at any zoom.
constexpr int kDpi = 96;
constexpr double kMarginMm = 16.0;
constexpr double kBottomMarginMm = 20.0;
constexpr double kFigureShare = 0.8;  // a figure's drawing takes at most this share of a page's height

// The palette of the HTML's style sheet.
const QColor kInk(0x1d, 0x21, 0x25);
const QColor kMuted(0x5a, 0x64, 0x70);
const QColor kRule(0xd5, 0xda, 0xe0);
const QColor kPanel(0xf5, 0xf7, 0xf9);
const QColor kAccent(0x2d, 0x4f, 0x7c);
const QColor kCaution(0x9a, 0x5b, 0x00);
const QColor kCautionBackground(0xff, 0xf6, 0xe6);
const QColor kWarning(0xa3, 0x26, 0x1d);
const QColor kWarningBackground(0xfd, 0xee, 0xed);

constexpr int kFigureObject = QTextFormat::UserObject + 1;
constexpr int kSvgProperty = QTextFormat::UserProperty + 1;
constexpr int kSizeProperty = QTextFormat::UserProperty + 2;
constexpr int kHeadingProperty = QTextFormat::UserProperty + 3;  // on heading blocks: keep with what follows
constexpr int kGroupProperty = QTextFormat::UserProperty + 4;    // blocks with one group number stay on one page
constexpr int kTableProperty = QTextFormat::UserProperty + 5;    // on a data table: its ordinal in the document
constexpr int kRowOffsetProperty = QTextFormat::UserProperty + 6;  // and the data row its second row shows

// Where a data table is cut so that a row does not straddle two pages: (table ordinal, data
// row that starts the next piece). See keepRowsWhole().
using TableCuts = std::set<std::pair<int, int>>;

// Draws a figure's SVG into the text layout as vectors.
class SvgFigure : public QObject, public QTextObjectInterface {
    Q_OBJECT
    Q_INTERFACES(QTextObjectInterface)
public:
    using QObject::QObject;
    QSizeF intrinsicSize(QTextDocument*, int, const QTextFormat& format) override {
        return format.property(kSizeProperty).toSizeF();
    }
    void drawObject(QPainter* painter, const QRectF& rect, QTextDocument*, int, const QTextFormat& format) override {
        QSvgRenderer renderer(format.property(kSvgProperty).toByteArray());
        if (renderer.isValid()) renderer.render(painter, rect);
        painter->save();
        painter->setPen(QPen(kRule, 1));
        painter->setBrush(Qt::NoBrush);
        painter->drawRect(rect);
        painter->restore();
    }
};

struct Styles {
    QFont body, small, code, smallCode, title, heading2, heading3;
};

Styles makeStyles() {
    Styles s;
    s.body = QFont(QGuiApplication::font().family());
    s.body.setPointSizeF(9.5);
    s.small = s.body;
    s.small.setPointSizeF(8.0);
    s.code = QFontDatabase::systemFont(QFontDatabase::FixedFont);
    s.code.setPointSizeF(8.5);
    s.smallCode = s.code;
    s.smallCode.setPointSizeF(7.5);
    s.title = s.body;
    s.title.setPointSizeF(20);
    s.title.setBold(true);
    s.heading2 = s.body;
    s.heading2.setPointSizeF(14);
    s.heading2.setBold(true);
    s.heading3 = s.body;
    s.heading3.setPointSizeF(10.5);
    s.heading3.setBold(true);
    return s;
}

QTextCharFormat charFormat(const QFont& font, const QColor& colour = kInk) {
    QTextCharFormat f;
    f.setFont(font);
    f.setForeground(colour);
    return f;
}

QTextBlockFormat blockFormat(double top, double bottom) {
    QTextBlockFormat f;
    f.setTopMargin(top);
    f.setBottomMargin(bottom);
    return f;
}

class Builder {
public:
    Builder(QTextDocument& document, QSizeF content, const TableCuts& cuts)
        : document_(document), cursor_(&document), width_(content.width()), height_(content.height()), styles_(makeStyles()),
          cuts_(cuts) {}

    void build(const report::Document& d) {
        // The first block exists already; it becomes the header.
        QTextBlockFormat kind = blockFormat(0, 2);
        cursor_.setBlockFormat(kind);
        QFont kindFont = styles_.small;
        kindFont.setBold(true);
        kindFont.setCapitalization(QFont::AllUppercase);
        kindFont.setLetterSpacing(QFont::PercentageSpacing, 108);
        cursor_.insertText(QStringLiteral("Review report"), charFormat(kindFont, kAccent));
        cursor_.insertBlock(blockFormat(0, 4), charFormat(styles_.title));
        cursor_.insertText(QString::fromStdString(d.title), charFormat(styles_.title));
        QTextBlockFormat sub = blockFormat(0, 6);
        cursor_.insertBlock(sub, charFormat(styles_.small, kMuted));
        cursor_.insertText(QString::fromStdString(d.subtitle), charFormat(styles_.small, kMuted));
        rule(kAccent, 2.5);
        for (const report::Section& section : d.sections) {
            QTextBlockFormat h = blockFormat(first_ ? 4 : 18, 6);
            h.setProperty(kHeadingProperty, true);
            first_ = false;
            cursor_.insertBlock(h, charFormat(styles_.heading2, kAccent));
            cursor_.insertText(QString::fromStdString(section.title), charFormat(styles_.heading2, kAccent));
            for (const report::Block& b : section.blocks) block(b);
        }
    }

private:
    // A horizontal line: an empty one-row frame with a bottom border is not available, so a
    // block with a rule-coloured bottom border drawn by a 1-cell table of no height.
    void rule(const QColor& colour, double weight) {
        QTextTableFormat f;
        f.setBorder(0);
        f.setCellSpacing(0);
        f.setCellPadding(0);
        f.setWidth(QTextLength(QTextLength::PercentageLength, 100));
        f.setBottomMargin(6);
        QTextTable* t = cursor_.insertTable(1, 1, f);
        QTextTableCellFormat cell;
        cell.setBottomBorder(weight);
        cell.setBottomBorderBrush(colour);
        cell.setBottomBorderStyle(QTextFrameFormat::BorderStyle_Solid);
        QFont tiny = styles_.small;
        tiny.setPointSizeF(1);
        cell.setFont(tiny);
        t->cellAt(0, 0).setFormat(cell);
        cursor_.movePosition(QTextCursor::End);
    }

    void text(const report::Text& spans, const QFont& font, const QFont& codeFont, const QColor& colour = kInk) {
        for (const report::Span& span : spans) {
            if (!span.swatch.empty()) {
                QTextCharFormat box = charFormat(font, QColor(QString::fromStdString(span.swatch)));
                cursor_.insertText(QStringLiteral("■ "), box);
            }
            QTextCharFormat f = charFormat(span.style == report::Span::Style::Code ? codeFont : font, colour);
            if (span.style == report::Span::Style::Strong) f.setFontWeight(QFont::Bold);
            if (span.style == report::Span::Style::Emphasis) {
                f.setFontItalic(true);
                f.setForeground(kMuted);
            }
            if (span.style == report::Span::Style::Code) f.setBackground(kPanel);
            cursor_.insertText(QString::fromStdString(span.text), f);
        }
    }

    void paragraphBlock(double top, double bottom) { cursor_.insertBlock(blockFormat(top, bottom), charFormat(styles_.body)); }

    void block(const report::Block& b) {
        switch (b.kind) {
        case report::Block::Kind::Heading: {
            QTextBlockFormat h = blockFormat(10, 4);
            h.setProperty(kHeadingProperty, true);
            cursor_.insertBlock(h, charFormat(styles_.heading3));
            text(b.text, styles_.heading3, styles_.code);
            break;
        }
        case report::Block::Kind::Paragraph:
            paragraphBlock(2, 6);
            text(b.text, styles_.body, styles_.code);
            break;
        case report::Block::Kind::Fields: fieldsTable(b.fields); break;
        case report::Block::Kind::Table: table(b.table); break;
        case report::Block::Kind::Preformatted: preformatted(b.preformatted); break;
        case report::Block::Kind::Figure: figure(b.figure); break;
        case report::Block::Kind::Callout: callout(b); break;
        case report::Block::Kind::List: {
            paragraphBlock(2, 2);
            QTextListFormat listFormat;
            listFormat.setStyle(QTextListFormat::ListDisc);
            listFormat.setIndent(1);
            QTextList* list = cursor_.createList(listFormat);
            for (std::size_t i = 0; i < b.items.size(); ++i) {
                if (i > 0) {
                    cursor_.insertBlock(blockFormat(1, 1), charFormat(styles_.body));
                    list->add(cursor_.block());
                }
                text(b.items[i], styles_.body, styles_.code);
            }
            break;
        }
        }
    }

    QTextTableFormat tableFormat(bool fullWidth) {
        QTextTableFormat f;
        f.setBorder(0);
        f.setCellSpacing(0);
        f.setCellPadding(3);
        f.setTopMargin(4);
        f.setBottomMargin(8);
        if (fullWidth) f.setWidth(QTextLength(QTextLength::PercentageLength, 100));
        return f;
    }

    void fieldsTable(const std::vector<report::Field>& list) {
        if (list.empty()) return;
        QTextTableFormat f = tableFormat(true);
        f.setColumnWidthConstraints({QTextLength(QTextLength::PercentageLength, 28), QTextLength(QTextLength::PercentageLength, 72)});
        QTextTable* t = cursor_.insertTable(static_cast<int>(list.size()), 2, f);
        for (std::size_t r = 0; r < list.size(); ++r) {
            cursor_ = t->cellAt(static_cast<int>(r), 0).firstCursorPosition();
            cursor_.insertText(QString::fromStdString(list[r].label), charFormat(styles_.body, kMuted));
            cursor_ = t->cellAt(static_cast<int>(r), 1).firstCursorPosition();
            text(list[r].value, styles_.body, styles_.code);
        }
        cursor_.movePosition(QTextCursor::End);
    }

    // Column widths as a browser's automatic table layout chooses them: each column at least as
    // wide as its longest word, at most as wide as its longest cell; when the cells do not fit
    // on one line each, the room left after the longest words goes to the columns in proportion
    // to how much more they would take. (Qt's own layout, with text that may wrap anywhere,
    // squeezes a column down to a letter or two.)
    QVector<QTextLength> columnWidths(const report::Table& data, const QFont& font, const QFont& codeFont) const {
        const std::size_t columns = data.header.size();
        QPaintDevice* device = document_.documentLayout()->paintDevice();
        const QFontMetricsF plainMetrics(font, device), codeMetrics(codeFont, device);
        QFont bold = font;
        bold.setBold(true);
        const QFontMetricsF boldMetrics(bold, device);
        constexpr double kCellPadding = 3 + 8 + 2;  // the left padding, the right padding, rounding
        std::vector<double> least(columns, 0), natural(columns, 0);
        auto measure = [&](const report::Text& text, const QFontMetricsF* forced, std::size_t c) {
            double full = 0, word = 0;
            for (const report::Span& span : text) {
                const QFontMetricsF& m = forced ? *forced : span.style == report::Span::Style::Code ? codeMetrics : plainMetrics;
                if (!span.swatch.empty()) full += plainMetrics.horizontalAdvance(QStringLiteral("■ "));
                const QString value = QString::fromStdString(span.text);
                full += m.horizontalAdvance(value);
                // Lines may break at spaces and after hyphens ("Levenberg-" / "Marquardt").
                for (const QString& w : value.split(QLatin1Char(' '), Qt::SkipEmptyParts))
                    for (QString piece : w.split(QLatin1Char('-'))) {
                        if (piece.size() < w.size()) piece += QLatin1Char('-');
                        word = std::max(word, m.horizontalAdvance(piece));
                    }
            }
            if (!text.empty() && !text.front().swatch.empty()) word += plainMetrics.horizontalAdvance(QStringLiteral("■ "));
            natural[c] = std::max(natural[c], full + kCellPadding);
            least[c] = std::max(least[c], word + kCellPadding);
        };
        // Headers wrap between words; numbers do not wrap.
        for (std::size_t c = 0; c < columns; ++c) measure({report::plain(data.header[c])}, &boldMetrics, c);
        for (const auto& row : data.rows)
            for (std::size_t c = 0; c < columns && c < row.size(); ++c) {
                measure(row[c].text, nullptr, c);
                if (row[c].numeric) least[c] = std::max(least[c], natural[c]);
            }
        double sumLeast = 0, sumNatural = 0;
        for (std::size_t c = 0; c < columns; ++c) {
            natural[c] = std::max(natural[c], least[c]);
            sumLeast += least[c];
            sumNatural += natural[c];
        }
        QVector<QTextLength> widths;
        if (sumLeast >= width_) {  // even the longest words do not fit: shrink them all alike
            for (std::size_t c = 0; c < columns; ++c) widths.append(QTextLength(QTextLength::FixedLength, least[c] * width_ / sumLeast));
            return widths;
        }  // cannot fit even so: leave it to Qt
        const double spare = width_ - sumLeast, wanted = sumNatural - sumLeast;
        for (std::size_t c = 0; c < columns; ++c) {
            const double w = sumNatural <= width_ ? natural[c] : least[c] + spare * (natural[c] - least[c]) / wanted;
            widths.append(QTextLength(QTextLength::FixedLength, w));
        }
        return widths;
    }

    // A data table, in pieces where keepRowsWhole() asked for a cut: each piece repeats the
    // header and starts a page.
    void table(const report::Table& data) {
        const int columns = static_cast<int>(data.header.size());
        if (columns == 0) return;
        const int ordinal = tables_++;
        const int rows = static_cast<int>(data.rows.size());
        std::vector<int> bounds{0};
        bool breakFirst = false;
        for (auto it = cuts_.lower_bound({ordinal, 0}); it != cuts_.end() && it->first == ordinal; ++it) {
            if (it->second == 0) breakFirst = true;
            else if (it->second < rows) bounds.push_back(it->second);
        }
        bounds.push_back(rows);
        const QVector<QTextLength> widths = columnWidths(data, data.compact ? styles_.small : styles_.body,
                                                         data.compact ? styles_.smallCode : styles_.code);
        for (std::size_t piece = 0; piece + 1 < bounds.size(); ++piece)
            tablePiece(data, ordinal, bounds[piece], bounds[piece + 1], widths, piece > 0 || breakFirst);
    }

    void tablePiece(const report::Table& data, int ordinal, int first, int last, const QVector<QTextLength>& widths,
                    bool newPage) {
        const int columns = static_cast<int>(data.header.size());
        const int rows = last - first + 1;
        const QFont& font = data.compact ? styles_.small : styles_.body;
        const QFont& codeFont = data.compact ? styles_.smallCode : styles_.code;
        QTextTableFormat f = tableFormat(false);
        f.setHeaderRowCount(1);
        f.setColumnWidthConstraints(widths);
        f.setProperty(kTableProperty, ordinal);
        f.setProperty(kRowOffsetProperty, first);
        if (newPage) {
            f.setPageBreakPolicy(QTextFormat::PageBreak_AlwaysBefore);
            f.setTopMargin(0);
        }
        QTextTable* t = cursor_.insertTable(rows, columns, f);
        std::vector<bool> numeric(static_cast<std::size_t>(columns), !data.rows.empty());
        for (const auto& row : data.rows)
            for (int c = 0; c < columns; ++c)
                if (c >= static_cast<int>(row.size()) || !row[static_cast<std::size_t>(c)].numeric)
                    numeric[static_cast<std::size_t>(c)] = false;
        for (int c = 0; c < columns; ++c) {
            QTextTableCell cell = t->cellAt(0, c);
            QTextTableCellFormat cf;
            cf.setBottomBorder(1.5);
            cf.setBottomBorderBrush(kInk);
            cf.setBottomBorderStyle(QTextFrameFormat::BorderStyle_Solid);
            cf.setRightPadding(8);
            cell.setFormat(cf);
            cursor_ = cell.firstCursorPosition();
            QTextBlockFormat bf = cursor_.blockFormat();
            bf.setAlignment(numeric[static_cast<std::size_t>(c)] ? Qt::AlignRight : Qt::AlignLeft);
            cursor_.setBlockFormat(bf);
            QFont bold = font;
            bold.setBold(true);
            cursor_.insertText(QString::fromStdString(data.header[static_cast<std::size_t>(c)]), charFormat(bold));
        }
        for (int r = 1; r < rows; ++r) {
            const int dataRow = first + r - 1;
            const auto& row = data.rows[static_cast<std::size_t>(dataRow)];
            for (int c = 0; c < columns && c < static_cast<int>(row.size()); ++c) {
                const report::Cell& value = row[static_cast<std::size_t>(c)];
                QTextTableCell cell = t->cellAt(r, c);
                QTextTableCellFormat cf;
                cf.setBottomBorder(0.75);
                cf.setBottomBorderBrush(kRule);
                cf.setBottomBorderStyle(QTextFrameFormat::BorderStyle_Solid);
                cf.setRightPadding(8);
                if (dataRow % 2 == 1) cf.setBackground(QColor(0xfa, 0xfb, 0xfc));
                cell.setFormat(cf);
                cursor_ = cell.firstCursorPosition();
                QTextBlockFormat bf = cursor_.blockFormat();
                bf.setAlignment(value.numeric ? Qt::AlignRight : Qt::AlignLeft);
                if (value.numeric) bf.setNonBreakableLines(true);
                cursor_.setBlockFormat(bf);
                text(value.text, font, codeFont);
            }
        }
        cursor_.movePosition(QTextCursor::End);
    }

    void boxed(const std::function<void()>& content, const QColor& background, const QColor& edge) {
        QTextTableFormat f = tableFormat(true);
        f.setCellPadding(6);
        f.setBackground(background);
        f.setBorder(0);
        QTextTable* t = cursor_.insertTable(1, 1, f);
        QTextTableCellFormat cf;
        cf.setLeftBorder(3.5);
        cf.setLeftBorderBrush(edge);
        cf.setLeftBorderStyle(QTextFrameFormat::BorderStyle_Solid);
        cf.setLeftPadding(9);
        t->cellAt(0, 0).setFormat(cf);
        cursor_ = t->cellAt(0, 0).firstCursorPosition();
        content();
        cursor_.movePosition(QTextCursor::End);
    }

    void preformatted(const std::string& body) {
        boxed(
            [&] {
                const QTextBlockFormat bf = cursor_.blockFormat();
                // One block per line keeps a long listing free to break between lines.
                const QStringList lines = QString::fromStdString(body).split(QLatin1Char('\n'));
                for (int i = 0; i < lines.size(); ++i) {
                    if (i > 0) cursor_.insertBlock(bf, charFormat(styles_.code));
                    cursor_.insertText(lines[i], charFormat(styles_.code));
                }
            },
            kPanel, kRule);
    }

    void callout(const report::Block& b) {
        QColor background = kPanel, edge = kAccent;
        if (b.tone == "caution") {
            background = kCautionBackground;
            edge = kCaution;
        } else if (b.tone == "warning") {
            background = kWarningBackground;
            edge = kWarning;
        }
        boxed([&] { text(b.text, styles_.body, styles_.code); }, background, edge);
    }

    // Title, drawing and caption: three blocks of one keep-together group (see keepTogether()).
    void figure(const report::Figure& f) {
        const int group = ++groups_;
        QTextBlockFormat title = blockFormat(12, 4);
        title.setProperty(kGroupProperty, group);
        cursor_.insertBlock(title, charFormat(styles_.heading3));
        cursor_.insertText(QString::fromStdString(f.title), charFormat(styles_.heading3));
        QTextBlockFormat drawing = blockFormat(0, 2);
        drawing.setAlignment(Qt::AlignHCenter);
        drawing.setProperty(kGroupProperty, group);
        cursor_.insertBlock(drawing, charFormat(styles_.body));
        const double scale =
            std::min({1.0, width_ / std::max(1.0, f.width), kFigureShare * height_ / std::max(1.0, f.height)});
        QTextCharFormat object;
        object.setObjectType(kFigureObject);
        object.setProperty(kSvgProperty, QByteArray::fromStdString(f.svg));
        object.setProperty(kSizeProperty, QSizeF(f.width * scale, f.height * scale));
        cursor_.insertText(QString(QChar::ObjectReplacementCharacter), object);
        QTextBlockFormat caption = blockFormat(2, 12);
        caption.setProperty(kGroupProperty, group);
        cursor_.insertBlock(caption, charFormat(styles_.small, kMuted));
        cursor_.insertText(QString::fromStdString(f.caption), charFormat(styles_.small, kMuted));
    }

    QTextDocument& document_;
    QTextCursor cursor_;
    double width_, height_;
    Styles styles_;
    bool first_ = true;
    int groups_ = 0;
    const TableCuts& cuts_;
    int tables_ = 0;
};

// Qt's layout moves a line that does not fit to the next page, but it knows nothing of what
// belongs together. After it has laid the document out, two rules move a block to a new page
// (a page break before it), one move at a time since each shifts everything after it:
//   - a keep-together group (a figure's title, drawing and caption) that spans two pages
//     starts a page;
//   - a heading whose content starts on a later page, or leaves less than a few lines of it
//     under the heading, starts a page, and takes that content with it.
// A block already at the top of a page never gets a break (that would leave a blank page).
void keepTogether(QTextDocument& document, double pageHeight) {
    QAbstractTextDocumentLayout* layout = document.documentLayout();
    auto pageOf = [pageHeight](double y) { return static_cast<int>(std::floor(y / pageHeight)); };
    auto atPageTop = [&](double y) { return y - pageOf(y) * pageHeight < 2.0; };
    // A block's rectangle in document coordinates; a block inside a table reports its place
    // in the table, so take the table's frame instead.
    auto extent = [&](const QTextBlock& block) {
        if (QTextFrame* frame = document.frameAt(block.position()); frame && frame != document.rootFrame())
            return layout->frameBoundingRect(frame);
        return layout->blockBoundingRect(block);
    };
    auto breakBefore = [](const QTextBlock& block) {
        QTextCursor cursor(block);
        QTextBlockFormat f = block.blockFormat();
        f.setPageBreakPolicy(QTextFormat::PageBreak_AlwaysBefore);
        cursor.setBlockFormat(f);
    };
    for (int round = 0; round < 200; ++round) {
        bool moved = false;
        for (QTextBlock block = document.begin(); block.isValid() && !moved; block = block.next()) {
            const QTextBlockFormat format = block.blockFormat();
            if (format.pageBreakPolicy() & QTextFormat::PageBreak_AlwaysBefore) continue;
            const QRectF rect = layout->blockBoundingRect(block);
            if (atPageTop(rect.top())) continue;
            if (format.hasProperty(kGroupProperty)) {
                const int group = format.intProperty(kGroupProperty);
                const QTextBlock previous = block.previous();
                if (previous.isValid() && previous.blockFormat().intProperty(kGroupProperty) == group) continue;
                QTextBlock last = block;
                while (last.next().isValid() && last.next().blockFormat().intProperty(kGroupProperty) == group) last = last.next();
                const double bottom = layout->blockBoundingRect(last).bottom();
                // (A group always fits on a page: figures are scaled to at most kFigureShare of its
                // height. Its extent here may include the gap Qt left where it moved a line.)
                if (pageOf(rect.top()) != pageOf(bottom - 1)) {
                    breakBefore(block);
                    moved = true;
                }
            } else if (format.hasProperty(kHeadingProperty) && block.next().isValid()) {
                const QRectF following = extent(block.next());
                const double firstLines = std::min(following.height(), 48.0);
                if (pageOf(following.top() + firstLines - 1) > pageOf(rect.top())) {
                    breakBefore(block);
                    // What the heading introduces follows it onto the new page.
                    const QTextBlock next = block.next();
                    if (next.blockFormat().pageBreakPolicy() & QTextFormat::PageBreak_AlwaysBefore) {
                        QTextCursor cursor(next);
                        QTextBlockFormat f = next.blockFormat();
                        f.setPageBreakPolicy(QTextFormat::PageBreak_Auto);
                        cursor.setBlockFormat(f);
                    }
                    moved = true;
                }
            }
        }
        if (!moved) return;
    }
}

// A4 with the report's margins; returns the size of a page's text area.
QSizeF setUpPages(QPdfWriter& writer) {
    writer.setResolution(kDpi);
    writer.setPageLayout(QPageLayout(QPageSize(QPageSize::A4), QPageLayout::Portrait,
                                     QMarginsF(kMarginMm, kMarginMm, kMarginMm, kBottomMarginMm), QPageLayout::Millimeter));
    const QRectF page = writer.pageLayout().paintRectPixels(kDpi);
    return {page.width(), page.height()};
}

// Every data row of the laid-out document with the pages its top and bottom fall on.
struct RowPlace {
    int table = 0, row = 0;  // table ordinal, data row
    int firstPage = 0, lastPage = 0;
    double height = 0;
};
std::vector<RowPlace> rowPlaces(QTextDocument& document, double pageHeight) {
    QAbstractTextDocumentLayout* layout = document.documentLayout();
    std::vector<RowPlace> places;
    std::function<void(QTextFrame*)> visit = [&](QTextFrame* frame) {
        for (QTextFrame* child : frame->childFrames()) {
            auto* table = qobject_cast<QTextTable*>(child);
            if (!table || !table->format().hasProperty(kTableProperty)) {
                visit(child);
                continue;
            }
            const int ordinal = table->format().intProperty(kTableProperty);
            const int offset = table->format().intProperty(kRowOffsetProperty);
            for (int r = 1; r < table->rows(); ++r) {
                double top = std::numeric_limits<double>::infinity(), bottom = -top;
                for (int c = 0; c < table->columns(); ++c) {
                    const QTextTableCell cell = table->cellAt(r, c);
                    top = std::min(top, layout->blockBoundingRect(cell.firstCursorPosition().block()).top());
                    bottom = std::max(bottom, layout->blockBoundingRect(cell.lastCursorPosition().block()).bottom());
                }
                if (!(bottom > top)) continue;
                places.push_back({ordinal, offset + r - 1, static_cast<int>(std::floor(top / pageHeight)),
                                  static_cast<int>(std::floor((bottom - 1) / pageHeight)), bottom - top});
            }
        }
    };
    visit(document.rootFrame());
    return places;
}

// The report laid out on pages: the document and the figure handler it draws with.
struct LaidOut {
    SvgFigure figures;
    QTextDocument document;
};

std::unique_ptr<LaidOut> layOut(const report::Document& d, QPdfWriter& writer, QSizeF content, const TableCuts& cuts) {
    auto laid = std::make_unique<LaidOut>();
    QTextDocument& document = laid->document;
    document.documentLayout()->setPaintDevice(&writer);
    document.setDocumentMargin(0);
    document.setUseDesignMetrics(true);
    QTextOption option;
    option.setWrapMode(QTextOption::WrapAtWordBoundaryOrAnywhere);
    document.setDefaultTextOption(option);
    document.setDefaultFont(makeStyles().body);
    document.documentLayout()->registerHandler(kFigureObject, &laid->figures);
    document.setPageSize(content);
    {
        // One edit block: Qt lays the document out once at its end, not after every cell (which
        // made building the tables quadratic).
        QTextCursor edit(&document);
        edit.beginEditBlock();
        Builder(document, content, cuts).build(d);
        edit.endEditBlock();
    }
    keepTogether(document, content.height());
    return laid;
}

// Qt moves a table row to the next page only when none of its cells starts on this one; a row
// whose first line fits is split, its other lines under the repeated header overleaf. So: lay
// out, find the first row that straddles two pages, cut its table before that row (the piece
// after the cut starts a page with the header again), lay out again; until no row straddles.
// A row taller than half a page stays split (it could not be kept whole anyway).
std::unique_ptr<LaidOut> keepRowsWhole(const report::Document& d, QPdfWriter& writer, QSizeF content) {
    TableCuts cuts;
    std::unique_ptr<LaidOut> laid = layOut(d, writer, content, cuts);
    for (int round = 0; round < 100; ++round) {
        bool cut = false;
        for (const RowPlace& place : rowPlaces(laid->document, content.height())) {
            if (place.firstPage == place.lastPage || place.height > 0.5 * content.height()) continue;
            cut = cuts.insert({place.table, place.row}).second;
            break;
        }
        if (!cut) break;
        laid = layOut(d, writer, content, cuts);
    }
    return laid;
}

}  // namespace

std::vector<std::pair<int, int>> pdfTableRowPages(const report::Document& d) {
    QBuffer buffer;
    buffer.open(QIODevice::WriteOnly);
    QPdfWriter writer(&buffer);
    const QSizeF content = setUpPages(writer);
    const std::unique_ptr<LaidOut> laid = keepRowsWhole(d, writer, content);
    std::vector<std::pair<int, int>> pages;
    for (const RowPlace& place : rowPlaces(laid->document, content.height())) pages.emplace_back(place.firstPage, place.lastPage);
    return pages;
}

std::string writePdf(const report::Document& d) {
    QBuffer buffer;
    buffer.open(QIODevice::WriteOnly);
    QPdfWriter writer(&buffer);
    const QSizeF content = setUpPages(writer);
    writer.setTitle(QString::fromStdString(d.title));
    writer.setCreator(QStringLiteral("Saddlewise"));

    const std::unique_ptr<LaidOut> laid = keepRowsWhole(d, writer, content);
    QTextDocument& document = laid->document;

    QPainter painter;
    if (!painter.begin(&writer)) throw std::runtime_error("Qt could not start the PDF");
    const int pages = document.pageCount();
    QFont footerFont = makeStyles().small;
    footerFont.setPointSizeF(7.5);
    for (int p = 0; p < pages; ++p) {
        if (p > 0 && !writer.newPage()) throw std::runtime_error("Qt could not start a new PDF page");
        painter.save();
        painter.translate(0, -p * content.height());
        const QRectF visible(0, p * content.height(), content.width(), content.height());
        QAbstractTextDocumentLayout::PaintContext context;
        context.clip = visible;
        context.palette.setColor(QPalette::Text, kInk);
        painter.setClipRect(visible);
        document.documentLayout()->draw(&painter, context);
        painter.restore();

        // The footer sits in the bottom margin: the title on the left, the page on the right.
        painter.save();
        painter.setFont(footerFont);
        painter.setPen(kMuted);
        const double y = content.height() + 18;
        const QRectF footer(0, y, content.width(), 16);
        const QString pageText = QStringLiteral("page %1 of %2").arg(p + 1).arg(pages);
        const QFontMetricsF metrics(footerFont, &writer);
        const QString title = metrics.elidedText(QString::fromStdString(d.footer), Qt::ElideRight,
                                                 content.width() - metrics.horizontalAdvance(pageText) - 24);
        painter.drawText(footer, Qt::AlignLeft | Qt::AlignVCenter, title);
        painter.drawText(footer, Qt::AlignRight | Qt::AlignVCenter, pageText);
        painter.setPen(QPen(kRule, 0.75));
        painter.drawLine(QPointF(0, y - 4), QPointF(content.width(), y - 4));
        painter.restore();
    }
    if (!painter.end()) throw std::runtime_error("Qt could not finish the PDF");

    buffer.close();
    return buffer.data().toStdString();
}

}  // namespace sw::reportgui

#include "pdf.moc"
