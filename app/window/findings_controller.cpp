#include "app/window/findings_controller.h"

#include "app/window/findings_panel.h"
#include "app/window/lineup_editor.h"
#include "app/window/main_window.h"
#include "widgets/evidence_overlay.h"
#include "widgets/landscape_view.h"
#include "widgets/theme.h"

#include <QHelpEvent>
#include <QListWidget>
#include <QPainter>
#include <QStyledItemDelegate>
#include <QToolTip>

namespace sw::window {

// Draws a problem badge at the right end of a lineup entry whose run has problem findings,
// and names them in a tooltip. Keyed by the entry's label (labels are unique in a lineup), so
// it survives the lineup editor rebuilding its items.
class FindingFlagDelegate : public QStyledItemDelegate {
public:
    using QStyledItemDelegate::QStyledItemDelegate;
    std::map<QString, QStringList> flags;

    void paint(QPainter* painter, const QStyleOptionViewItem& option, const QModelIndex& index) const override {
        QStyledItemDelegate::paint(painter, option, index);
        auto it = flags.find(index.data(Qt::DisplayRole).toString());
        if (it == flags.end() || it->second.isEmpty()) return;
        const int size = std::min(option.rect.height() - 6, 16);
        const QRect badge(option.rect.right() - size - 6, option.rect.center().y() - size / 2, size, size);
        painter->save();
        painter->setRenderHint(QPainter::Antialiasing);
        painter->setPen(Qt::NoPen);
        painter->setBrush(widgets::problemTextColour(option.palette));
        painter->drawEllipse(badge);
        QFont font = option.font;
        font.setBold(true);
        font.setPixelSize(std::max(8, size - 4));
        painter->setFont(font);
        painter->setPen(option.palette.color(QPalette::Window).lightness() < 128 ? QColor(30, 30, 30) : QColor(Qt::white));
        painter->drawText(badge, Qt::AlignCenter, QString::number(it->second.size()));
        painter->restore();
    }

    bool helpEvent(QHelpEvent* event, QAbstractItemView* view, const QStyleOptionViewItem& option,
                   const QModelIndex& index) override {
        auto it = flags.find(index.data(Qt::DisplayRole).toString());
        if (event && it != flags.end() && !it->second.isEmpty()) {
            const QString base = index.data(Qt::ToolTipRole).toString();
            QToolTip::showText(event->globalPos(),
                               base + "\n" + QObject::tr("Findings: %1 (see the Findings panel)").arg(it->second.join(", ")),
                               view);
            return true;
        }
        return QStyledItemDelegate::helpEvent(event, view, option, index);
    }
};

FindingsController::FindingsController(MainWindow* window, FindingsPanel* panel)
    : QObject(window), window_(window), panel_(panel) {
    overlay_ = new widgets::EvidenceOverlay(window->landscape());
    flagDelegate_ = new FindingFlagDelegate(window->lineupEditor()->list());
    window->lineupEditor()->list()->setItemDelegate(flagDelegate_);
    connect(window->jobs(), &JobRunner::runsReady, this, &FindingsController::onRuns);
    connect(window->jobs(), &JobRunner::findingsReady, this, &FindingsController::onFindings);
    connect(panel_, &FindingsPanel::findingActivated, this, &FindingsController::onActivated);
    connect(window, &MainWindow::selectionChanged, panel_,
            [this](const widgets::Selection& selection) { panel_->setSelectedTrack(selection.track); });
    // Screenshot mode only (scripts/screenshots, docs/findings.md): "LABEL/finding-id" is shown
    // selected once its remedies are in, so the picture has a finding's detail and its marks.
    if (qEnvironmentVariableIsSet("SADDLEWISE_SCREENSHOT"))
        screenshotFinding_ = qEnvironmentVariable("SADDLEWISE_SCREENSHOT_FINDING");
}

const std::map<QString, QStringList>& FindingsController::flags() const { return flagDelegate_->flags; }

void FindingsController::onRuns(std::shared_ptr<const RunBatch> batch) {
    if (!batch || batch->objective != window_->objective()) return;  // results of a replaced objective
    runs_ = batch;
    DiagnosisRequest request;
    request.runsGeneration = batch->generation;
    request.objective = batch->objective;
    request.start = batch->start;
    request.rules = batch->rules;
    for (std::size_t i = 0; i < batch->runs.size() && i < batch->entries.size(); ++i) {
        request.methodIds.push_back(batch->entries[i].methodId);
        request.options.push_back(batch->entries[i].options);
        request.runs.push_back(batch->runs[i]);
    }
    // Reruns only once every run has finished (not after each animation step).
    request.tryRemedies = batch->allFinished && !batch->cancelled;
    window_->jobs()->diagnose(request);
}

void FindingsController::onFindings(std::shared_ptr<const FindingsBatch> batch) {
    if (!batch || !runs_ || batch->runsGeneration != runs_->generation || batch->objective != runs_->objective) return;
    findings_ = batch;
    std::vector<FindingsPanel::Track> tracks;
    for (const RunEntry& e : runs_->entries)
        tracks.push_back({QString::fromStdString(e.label), e.colour, e.marker});
    std::vector<std::string> names = batch->objective ? batch->objective->variableNames() : std::vector<std::string>{};
    panel_->setFindings(batch, tracks, names, !batch->remediesDone);

    flagDelegate_->flags.clear();
    for (std::size_t t = 0; t < batch->findings.size() && t < runs_->entries.size(); ++t) {
        QStringList problems;
        for (const diagnose::Finding& f : batch->findings[t])
            if (f.isProblem()) problems << QString::fromUtf8(diagnose::toString(f.id));
        if (!problems.isEmpty()) flagDelegate_->flags[QString::fromStdString(runs_->entries[t].label)] = problems;
    }
    window_->lineupEditor()->list()->viewport()->update();

    if (!screenshotFinding_.isEmpty() && batch->remediesDone) {
        const QString label = screenshotFinding_.section('/', 0, -2), id = screenshotFinding_.section('/', -1);
        for (std::size_t t = 0; t < runs_->entries.size(); ++t)
            if (QString::fromStdString(runs_->entries[t].label) == label)
                for (diagnose::FindingId candidate : diagnose::allFindingIds())
                    if (id == QString::fromUtf8(diagnose::toString(candidate)))
                        panel_->activate(static_cast<int>(t), candidate);
        screenshotFinding_.clear();
    }
    // Keep the marked evidence in step (e.g. the remedy's path arrives with the outcomes).
    int track = -1;
    if (const diagnose::Finding* current = panel_->currentFinding(&track)) showEvidence(track, *current);
    else overlay_->clear();
}

void FindingsController::onActivated(int track, int index) {
    if (!findings_ || track < 0 || track >= static_cast<int>(findings_->findings.size())) return;
    const auto& list = findings_->findings[static_cast<std::size_t>(track)];
    if (index < 0 || index >= static_cast<int>(list.size())) return;
    const diagnose::Finding& finding = list[static_cast<std::size_t>(index)];
    // Records may be thinned: select the last record at or before the finding's iteration.
    const auto& run = findings_->runs[static_cast<std::size_t>(track)];
    if (run && !run->trace.empty()) {
        int record = 0;
        for (std::size_t r = 0; r < run->trace.size(); ++r)
            if (run->trace[r].iteration <= finding.iterations.focus) record = static_cast<int>(r);
        window_->setSelection({track, record});
    }
    showEvidence(track, finding);
}

void FindingsController::showEvidence(int track, const diagnose::Finding& finding) {
    const auto snapshot = window_->snapshot();
    const bool rerun = finding.remedy && finding.remedy->outcome && finding.remedy->outcome->run;
    if ((finding.mark.empty() && !rerun) || !snapshot || !runs_ || track >= static_cast<int>(runs_->entries.size())) {
        overlay_->clear();
        return;
    }
    widgets::EvidenceOverlay::Content content;
    content.point = finding.mark.point;
    content.directions = finding.mark.directions;
    content.colour = runs_->entries[static_cast<std::size_t>(track)].colour;
    content.plotX = snapshot->plotX;
    content.plotY = snapshot->plotY;
    switch (finding.id) {
        case diagnose::FindingId::SaddleEnd:
        case diagnose::FindingId::MaximumEnd:
            content.bothWays = true;
            content.label = tr("f falls either way");
            break;
        case diagnose::FindingId::FlatDirection:
            content.bothWays = true;
            content.label = tr("flat");
            break;
        case diagnose::FindingId::NarrowValley:
            content.bothWays = true;
            content.label = tr("valley floor");
            break;
        case diagnose::FindingId::UphillNewton: content.label = tr("uphill step"); break;
        case diagnose::FindingId::Divergence: content.label = tr("drift"); break;
        case diagnose::FindingId::Stagnation: content.label = tr("−gradient"); break;
        default: break;
    }
    if (finding.remedy && finding.remedy->outcome) {
        content.remedyRun = finding.remedy->outcome->run;
        content.remedyLabel = tr("rerun: %1").arg(QString::fromStdString(finding.remedy->change.text.substr(
            0, finding.remedy->change.text.find(" ("))));
    }
    overlay_->show(content);
}

}  // namespace sw::window
