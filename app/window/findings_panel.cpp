#include "app/window/findings_panel.h"

#include "widgets/theme.h"

#include <QCheckBox>
#include <QComboBox>
#include <QEvent>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QPainter>
#include <QResizeEvent>
#include <QSplitter>
#include <QTextBrowser>
#include <QTreeWidget>
#include <QVBoxLayout>
#include <cmath>

namespace sw::window {

namespace {

constexpr int kTrackRole = Qt::UserRole;
constexpr int kIndexRole = Qt::UserRole + 1;

bool darkPalette(const QPalette& p) { return p.color(QPalette::Window).lightness() < 128; }

// Badges of our own: a filled disc with "!" for a problem, a ring with "i" for a note.
QIcon severityIcon(diagnose::Severity severity, const QPalette& palette) {
    QPixmap pixmap(32, 32);
    pixmap.fill(Qt::transparent);
    QPainter p(&pixmap);
    p.setRenderHint(QPainter::Antialiasing);
    QFont font = p.font();
    font.setBold(true);
    font.setPixelSize(20);
    p.setFont(font);
    const QRectF r(3, 3, 26, 26);
    if (severity == diagnose::Severity::Problem) {
        const QColor red = widgets::problemTextColour(palette);
        p.setPen(Qt::NoPen);
        p.setBrush(red);
        p.drawEllipse(r);
        p.setPen(darkPalette(palette) ? QColor(30, 30, 30) : QColor(Qt::white));
        p.drawText(r, Qt::AlignCenter, QStringLiteral("!"));
    } else {
        const QColor ink = palette.color(QPalette::Disabled, QPalette::WindowText);
        p.setPen(QPen(ink, 2.4));
        p.setBrush(Qt::NoBrush);
        p.drawEllipse(r.adjusted(1, 1, -1, -1));
        p.drawText(r, Qt::AlignCenter, QStringLiteral("i"));
    }
    return QIcon(pixmap);
}

QIcon trackIcon(const QColor& colour) {
    QPixmap pixmap(32, 32);
    pixmap.fill(Qt::transparent);
    QPainter p(&pixmap);
    p.setRenderHint(QPainter::Antialiasing);
    p.setPen(QPen(colour, 3));
    p.setBrush(colour.lighter(150));
    p.drawRoundedRect(QRectF(6, 6, 20, 20), 5, 5);
    return QIcon(pixmap);
}

QString plural(int n, const char* one, const char* many) {
    return QStringLiteral("%1 %2").arg(n).arg(QString::fromUtf8(n == 1 ? one : many));
}

QString iterationText(const diagnose::IterationSpan& s) {
    if (s.first < 0) return {};
    if (s.first == s.last) return QString::number(s.first);
    return QStringLiteral("%1–%2").arg(s.first).arg(s.last);
}

QString number(double v) {
    if (std::isnan(v)) return QStringLiteral("–");
    if (std::isinf(v)) return v > 0 ? QStringLiteral("∞") : QStringLiteral("−∞");
    return QString::number(v, 'g', 4);
}

QString escaped(const std::string& text) { return QString::fromStdString(text).toHtmlEscaped(); }

}  // namespace

FindingsPanel::FindingsPanel(QWidget* parent) : QWidget(parent) {
    setObjectName(QStringLiteral("findingsPanel"));
    summary_ = new QLabel(tr("No runs yet."), this);
    summary_->setObjectName(QStringLiteral("findingsSummary"));
    summary_->setWordWrap(true);
    summary_->setToolTip(tr("What the findings say in short, and whether remedies are still being tried"));
    scope_ = new QComboBox(this);
    scope_->addItem(tr("All runs"));
    scope_->addItem(tr("Selected run"));
    scope_->setToolTip(tr("List the findings of every run, or only of the run whose iterate is selected"));
    notes_ = new QCheckBox(tr("Notes"), this);
    notes_->setChecked(true);
    notes_->setToolTip(tr("Also list notes (how a run converged), not only problems"));

    tree_ = new QTreeWidget(this);
    tree_->setObjectName(QStringLiteral("findingsTree"));
    tree_->setColumnCount(3);
    tree_->setHeaderLabels({tr("Finding"), tr("Iterations"), tr("Remedy")});
    tree_->header()->setStretchLastSection(false);
    tree_->header()->setSectionResizeMode(0, QHeaderView::Stretch);
    tree_->header()->setSectionResizeMode(1, QHeaderView::ResizeToContents);
    tree_->header()->setSectionResizeMode(2, QHeaderView::ResizeToContents);
    tree_->setRootIsDecorated(true);
    tree_->setUniformRowHeights(true);
    tree_->setIconSize(QSize(16, 16));
    tree_->setToolTip(tr("Click a finding to select its iteration in every view and mark its evidence on the landscape"));

    detail_ = new QTextBrowser(this);
    detail_->setObjectName(QStringLiteral("findingDetail"));
    detail_->setOpenLinks(false);
    detail_->setToolTip(tr("The selected finding: the numbers behind it and the remedy that was tried"));
    detail_->setPlaceholderText(tr("Select a finding to see its evidence and the remedy that was tried."));

    splitter_ = new QSplitter(Qt::Vertical, this);
    splitter_->addWidget(tree_);
    splitter_->addWidget(detail_);
    splitter_->setStretchFactor(0, 5);
    splitter_->setStretchFactor(1, 4);
    splitter_->setChildrenCollapsible(false);

    auto* top = new QHBoxLayout;
    top->setContentsMargins(0, 0, 0, 0);
    top->addWidget(summary_, 1);
    top->addWidget(notes_);
    top->addWidget(scope_);
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(4, 4, 4, 4);
    layout->addLayout(top);
    layout->addWidget(splitter_, 1);

    connect(scope_, &QComboBox::currentIndexChanged, this, [this] { rebuild(); });
    connect(notes_, &QCheckBox::toggled, this, [this] { rebuild(); });
    connect(tree_, &QTreeWidget::currentItemChanged, this,
            [this](QTreeWidgetItem* current, QTreeWidgetItem*) { onCurrentItemChanged(current); });
    // A click on the current item again re-selects its iteration (the user may have moved away).
    connect(tree_, &QTreeWidget::itemClicked, this, [this](QTreeWidgetItem* item, int) {
        if (item == tree_->currentItem()) onCurrentItemChanged(item);
    });
}

void FindingsPanel::setUpdating() {
    pending_ = true;
    rebuild();
}

void FindingsPanel::setFindings(std::shared_ptr<const FindingsBatch> batch, std::vector<Track> tracks,
                                std::vector<std::string> variableNames, bool pending) {
    batch_ = std::move(batch);
    tracks_ = std::move(tracks);
    names_ = std::move(variableNames);
    pending_ = pending;
    rebuild();
}

void FindingsPanel::setSelectedTrack(int track) {
    if (track == selectedTrack_) return;
    selectedTrack_ = track;
    if (scope_->currentIndex() == 1) rebuild();
}

int FindingsPanel::shownFindingCount() const {
    int n = 0;
    for (int i = 0; i < tree_->topLevelItemCount(); ++i) n += tree_->topLevelItem(i)->childCount();
    return n;
}

const diagnose::Finding* FindingsPanel::currentFinding(int* track) const {
    if (!hasCurrent_ || !batch_ || currentTrack_ < 0 || currentTrack_ >= static_cast<int>(batch_->findings.size()))
        return nullptr;
    const diagnose::Finding* f = diagnose::findById(batch_->findings[static_cast<std::size_t>(currentTrack_)], currentId_);
    if (f && track) *track = currentTrack_;
    return f;
}

bool FindingsPanel::activate(int track, diagnose::FindingId id) {
    for (int i = 0; i < tree_->topLevelItemCount(); ++i) {
        QTreeWidgetItem* group = tree_->topLevelItem(i);
        for (int j = 0; j < group->childCount(); ++j) {
            QTreeWidgetItem* item = group->child(j);
            if (item->data(0, kTrackRole).toInt() != track || !batch_) continue;
            const int index = item->data(0, kIndexRole).toInt();
            const auto& list = batch_->findings[static_cast<std::size_t>(track)];
            if (index < static_cast<int>(list.size()) && list[static_cast<std::size_t>(index)].id == id) {
                if (tree_->currentItem() == item) onCurrentItemChanged(item);
                else tree_->setCurrentItem(item);
                return true;
            }
        }
    }
    return false;
}

void FindingsPanel::rebuild() {
    rebuilding_ = true;
    tree_->clear();
    int problems = 0, notes = 0, runsWithProblems = 0, helped = 0, tried = 0;
    QTreeWidgetItem* restore = nullptr;
    const bool onlySelected = scope_->currentIndex() == 1;
    const bool showNotes = notes_->isChecked();
    if (batch_) {
        for (std::size_t t = 0; t < batch_->findings.size() && t < tracks_.size(); ++t) {
            const diagnose::Findings& list = batch_->findings[t];
            int runProblems = 0;
            for (const diagnose::Finding& f : list) {
                if (f.isProblem()) ++runProblems;
                else ++notes;
                if (f.remedy && f.remedy->outcome) {
                    ++tried;
                    if (f.remedy->outcome->helped) ++helped;
                }
            }
            problems += runProblems;
            if (runProblems > 0) ++runsWithProblems;
            if (onlySelected && static_cast<int>(t) != selectedTrack_) continue;
            auto* group = new QTreeWidgetItem(tree_);
            const Track& track = tracks_[t];
            group->setIcon(0, trackIcon(track.colour));
            QString counts = runProblems == 0 ? tr("no problems") : plural(runProblems, "problem", "problems");
            group->setText(0, QStringLiteral("%1 — %2").arg(track.label, counts));
            group->setFirstColumnSpanned(false);
            group->setData(0, kTrackRole, static_cast<int>(t));
            group->setData(0, kIndexRole, -1);
            QFont bold = group->font(0);
            bold.setBold(true);
            group->setFont(0, bold);
            for (std::size_t k = 0; k < list.size(); ++k) {
                const diagnose::Finding& f = list[k];
                if (!showNotes && !f.isProblem()) continue;
                auto* item = new QTreeWidgetItem(group);
                item->setIcon(0, severityIcon(f.severity, palette()));
                item->setText(0, QString::fromUtf8(diagnose::describe(f.id).title));
                item->setText(1, iterationText(f.iterations));
                if (f.remedy && f.remedy->outcome) {
                    item->setText(2, f.remedy->outcome->helped ? tr("✓ helped") : tr("✗ no help"));
                    item->setToolTip(2, QString::fromStdString(f.remedy->change.text + ": " + f.remedy->outcome->text));
                } else if (f.remedy) {
                    item->setText(2, pending_ ? tr("trying…") : tr("not tried"));
                    item->setToolTip(2, QString::fromStdString(f.remedy->change.text));
                } else {
                    item->setText(2, QStringLiteral("–"));
                    item->setToolTip(2, tr("No automatic remedy for this finding"));
                }
                item->setToolTip(0, QStringLiteral("%1: %2").arg(QString::fromUtf8(diagnose::toString(f.id)),
                                                              QString::fromStdString(f.message)));
                item->setToolTip(1, tr("The iterations that show it; clicking selects iteration %1").arg(f.iterations.focus));
                item->setData(0, kTrackRole, static_cast<int>(t));
                item->setData(0, kIndexRole, static_cast<int>(k));
                if (f.isProblem()) item->setForeground(0, widgets::problemTextColour(palette()));
                if (hasCurrent_ && static_cast<int>(t) == currentTrack_ && f.id == currentId_) restore = item;
            }
            group->setExpanded(true);
        }
    }
    QString text;
    if (!batch_) {
        text = pending_ ? tr("Working out the findings…") : tr("No runs yet.");
    } else {
        text = problems == 0 ? tr("No problems found")
                             : plural(problems, "problem", "problems") + tr(" in ") + plural(runsWithProblems, "run", "runs");
        text += ", " + plural(notes, "note", "notes");
        if (tried > 0) text += tr("; remedies tried: %1, helped: %2").arg(tried).arg(helped);
        if (pending_) text += tr(" — trying remedies…");
    }
    summary_->setText(text);
    if (restore) {
        tree_->setCurrentItem(restore);
        showDetail(currentTrack_, restore->data(0, kIndexRole).toInt());
    } else if (hasCurrent_) {
        detail_->clear();
    }
    rebuilding_ = false;
}

void FindingsPanel::onCurrentItemChanged(QTreeWidgetItem* current) {
    if (rebuilding_ || !current || !batch_) return;
    const int track = current->data(0, kTrackRole).toInt();
    const int index = current->data(0, kIndexRole).toInt();
    if (index < 0) return;  // a run's group row
    const auto& list = batch_->findings[static_cast<std::size_t>(track)];
    if (index >= static_cast<int>(list.size())) return;
    hasCurrent_ = true;
    currentTrack_ = track;
    currentId_ = list[static_cast<std::size_t>(index)].id;
    showDetail(track, index);
    emit findingActivated(track, index);
}

void FindingsPanel::showDetail(int track, int index) { detail_->setHtml(detailHtml(track, index)); }

QString FindingsPanel::detailHtml(int track, int index) const {
    if (!batch_ || track < 0 || track >= static_cast<int>(batch_->findings.size())) return {};
    const auto& list = batch_->findings[static_cast<std::size_t>(track)];
    if (index < 0 || index >= static_cast<int>(list.size())) return {};
    const diagnose::Finding& f = list[static_cast<std::size_t>(index)];
    const QPalette pal = palette();
    const QString problem = widgets::problemTextColour(pal).name();
    const QString good = darkPalette(pal) ? QStringLiteral("#8fd9a8") : QStringLiteral("#17703a");
    const QString muted = pal.color(QPalette::Disabled, QPalette::WindowText).name();
    QString html;
    html += QStringLiteral("<p><b>%1</b> <span style='color:%2'>%3 · %4</span><br>")
                .arg(QString::fromUtf8(diagnose::describe(f.id).title).toHtmlEscaped(),
                     f.isProblem() ? problem : muted, QString::fromUtf8(diagnose::toString(f.id)),
                     f.isProblem() ? tr("problem") : tr("note"));
    html += QStringLiteral("%1</p>").arg(escaped(f.message));
    // One line per number, value first, so it reads in a narrow panel too.
    for (const diagnose::Evidence& e : f.evidence) {
        QString unit = QString::fromStdString(e.unit);
        if (unit != "degrees" && unit != "per iteration" && unit != "relative") unit.clear();
        QString name = QString::fromStdString(e.name);
        name.replace('_', ' ');
        html += QStringLiteral("<div><b>%1</b>%2 %3 <span style='color:%4'>— %5</span></div>")
                    .arg(number(e.value), unit.isEmpty() ? QString() : " " + unit.toHtmlEscaped(), name.toHtmlEscaped(),
                         muted, escaped(e.meaning));
    }
    if (f.remedy) {
        html += QStringLiteral("<p><b>%1</b> %2<br>").arg(tr("Remedy:"), escaped(f.remedy->change.text));
        if (f.remedy->outcome) {
            const diagnose::Outcome& o = *f.remedy->outcome;
            html += QStringLiteral("<span style='color:%1'>%2</span>")
                        .arg(o.helped ? good : problem, escaped(o.text));
            if (o.run) html += QStringLiteral("<br><span style='color:%1'>%2</span>")
                               .arg(muted, tr("The rerun's path is dashed on the landscape."));
        } else {
            html += pending_ ? tr("Being tried…") : tr("Not tried.");
        }
        html += QStringLiteral("</p>");
    } else if (f.isProblem()) {
        html += QStringLiteral("<p style='color:%1'>%2</p>").arg(muted, tr("No automatic remedy for this one."));
    }
    return html;
}

void FindingsPanel::resizeEvent(QResizeEvent* event) {
    QWidget::resizeEvent(event);
    const Qt::Orientation wanted = width() > 2 * height() ? Qt::Horizontal : Qt::Vertical;
    if (splitter_->orientation() != wanted) {
        splitter_->setOrientation(wanted);
        const int length = wanted == Qt::Horizontal ? splitter_->width() : splitter_->height();
        splitter_->setSizes({length * 5 / 9, length - length * 5 / 9});
    }
}

void FindingsPanel::changeEvent(QEvent* event) {
    QWidget::changeEvent(event);
    if (event->type() == QEvent::PaletteChange || event->type() == QEvent::ApplicationPaletteChange) rebuild();
}

}  // namespace sw::window
