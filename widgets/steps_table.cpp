#include "widgets/steps_table.h"

#include "widgets/plot_style.h"

#include <QHeaderView>
#include <QItemSelectionModel>
#include <QLabel>
#include <QTabBar>
#include <QTableView>
#include <QVBoxLayout>
#include <cmath>

namespace sw::widgets {

namespace {

QString shortNumber(double v) {
    if (std::isnan(v)) return {};
    if (std::isinf(v)) return v > 0 ? QStringLiteral("inf") : QStringLiteral("-inf");
    return QString::number(v, 'g', 6);
}

QString csvNumber(double v) {
    if (std::isnan(v)) return {};
    if (std::isinf(v)) return v > 0 ? QStringLiteral("inf") : QStringLiteral("-inf");
    return QString::number(v, 'g', 17);
}

QString csvText(QString text) {
    if (text.contains(',') || text.contains('"') || text.contains('\n')) {
        text.replace('"', "\"\"");
        return '"' + text + '"';
    }
    return text;
}

double eigenMin(const solve::IterationRecord& r) {
    return r.hessianEigenvalues.size() > 0 ? r.hessianEigenvalues(0) : solve::kNaN;
}
double eigenMax(const solve::IterationRecord& r) {
    return r.hessianEigenvalues.size() > 0 ? r.hessianEigenvalues(r.hessianEigenvalues.size() - 1) : solve::kNaN;
}

QString dampingText(const solve::IterationRecord& r) {
    if (std::isnan(r.damping)) return {};
    if (r.dampingName.empty()) return shortNumber(r.damping);
    return QString::fromStdString(r.dampingName) + " = " + shortNumber(r.damping);
}

}  // namespace

StepsModel::StepsModel(QObject* parent) : QAbstractTableModel(parent) {}

void StepsModel::setSnapshot(std::shared_ptr<const Snapshot> snapshot) {
    beginResetModel();
    snapshot_ = std::move(snapshot);
    if (snapshot_ && filter_ >= static_cast<int>(snapshot_->tracks.size())) filter_ = -1;
    rebuildRows();
    endResetModel();
}

void StepsModel::setTrackFilter(int track) {
    if (track == filter_) return;
    beginResetModel();
    filter_ = track;
    rebuildRows();
    endResetModel();
}

void StepsModel::rebuildRows() {
    rows_.clear();
    if (!snapshot_) return;
    for (int t = 0; t < static_cast<int>(snapshot_->tracks.size()); ++t) {
        if (filter_ >= 0 && t != filter_) continue;
        const auto& run = snapshot_->tracks[static_cast<std::size_t>(t)].run;
        if (!run) continue;
        for (int k = 0; k < static_cast<int>(run->trace.size()); ++k) rows_.push_back({t, k});
    }
}

int StepsModel::rowCount(const QModelIndex& parent) const {
    return parent.isValid() ? 0 : static_cast<int>(rows_.size());
}

int StepsModel::columnCount(const QModelIndex& parent) const { return parent.isValid() ? 0 : ColumnCount; }

Selection StepsModel::selectionAt(int row) const {
    if (row < 0 || row >= static_cast<int>(rows_.size())) return {};
    return rows_[static_cast<std::size_t>(row)];
}

int StepsModel::rowOf(const Selection& selection) const {
    for (int i = 0; i < static_cast<int>(rows_.size()); ++i)
        if (rows_[static_cast<std::size_t>(i)] == selection) return i;
    return -1;
}

QVariant StepsModel::data(const QModelIndex& index, int role) const {
    if (!index.isValid() || !snapshot_ || index.row() >= static_cast<int>(rows_.size())) return {};
    const Selection s = rows_[static_cast<std::size_t>(index.row())];
    const RunTrack& track = snapshot_->tracks[static_cast<std::size_t>(s.track)];
    const solve::IterationRecord& r = track.run->trace[static_cast<std::size_t>(s.iteration)];
    if (role == Qt::DecorationRole && index.column() == Method) return track.colour;
    if (role == Qt::TextAlignmentRole)
        return index.column() == Method || index.column() == StepKindColumn || index.column() == Note
                   ? QVariant(int(Qt::AlignLeft | Qt::AlignVCenter))
                   : QVariant(int(Qt::AlignRight | Qt::AlignVCenter));
    if (role == Qt::ToolTipRole) {
        if (index.column() == Note && !r.note.empty()) return QString::fromStdString(r.note.text());
        if (index.column() == StepLength && !r.trials.empty())
            return tr("%n line-search trial(s)", nullptr, static_cast<int>(r.trials.size()));
        if (index.column() == Iteration && !r.accepted) return tr("Step rejected: the iterate stays where it was");
        return {};
    }
    if (role != Qt::DisplayRole) return {};
    switch (index.column()) {
    case Method: return track.label;
    case Iteration: return r.iteration;
    case Value: return shortNumber(r.value);
    case GradientNorm: return shortNumber(r.gradientNorm);
    case StepKindColumn: {
        // The method is in the first column: show the kind only when it adds to it.
        if (r.stepKind == solve::StepKind::None) return QString();
        const QString what = stepDescription(track.run->methodId, r);
        if (r.accepted) return what;
        return what.isEmpty() ? tr("rejected") : tr("%1 (rejected)").arg(what);
    }
    case StepLength: return shortNumber(r.stepLength);
    case TrustRadius: return shortNumber(r.trustRadius);
    case Ratio: return shortNumber(r.ratio);
    case Damping: return dampingText(r);
    case EigenMin: return shortNumber(eigenMin(r));
    case EigenMax: return shortNumber(eigenMax(r));
    case Condition: return shortNumber(r.conditionNumber);
    case Angle: return shortNumber(r.angleToSteepestDescent());
    case Evaluations: return QString::number(r.evaluations.total());
    case Note: return QString::fromStdString(r.note.text());
    default: return {};
    }
}

QVariant StepsModel::headerData(int section, Qt::Orientation orientation, int role) const {
    if (orientation != Qt::Horizontal) return {};
    static const char* titles[ColumnCount] = {
        QT_TR_NOOP("Method"),    QT_TR_NOOP("k"),        QT_TR_NOOP("f"),
        QT_TR_NOOP("|∇f|"),      QT_TR_NOOP("Step"),     QT_TR_NOOP("α"),
        QT_TR_NOOP("Δ"),         QT_TR_NOOP("ρ"),        QT_TR_NOOP("Damping"),
        QT_TR_NOOP("λ min"),     QT_TR_NOOP("λ max"),    QT_TR_NOOP("Condition"),
        QT_TR_NOOP("Angle (°)"), QT_TR_NOOP("Evals"),    QT_TR_NOOP("Note")};
    static const char* tips[ColumnCount] = {
        QT_TR_NOOP("Lineup entry that made this iterate"),
        QT_TR_NOOP("Iteration number"),
        QT_TR_NOOP("Objective value at the iterate"),
        QT_TR_NOOP("Length of the gradient at the iterate"),
        QT_TR_NOOP("What the step from this iterate was, when its kind says more than the method: a trust-region "
                   "boundary step, a steepest-descent fallback, a simplex move, a damped step (the export keeps every "
                   "step's kind)"),
        QT_TR_NOOP("Step length accepted by the line search (1 for a full step)"),
        QT_TR_NOOP("Trust radius used for this step"),
        QT_TR_NOOP("Actual decrease divided by the decrease the model predicted"),
        QT_TR_NOOP("Damping, shift or momentum the method used"),
        QT_TR_NOOP("Smallest Hessian eigenvalue (negative: curving down)"),
        QT_TR_NOOP("Largest Hessian eigenvalue"),
        QT_TR_NOOP("Hessian condition number |λ|max / |λ|min"),
        QT_TR_NOOP("Angle between the step and steepest descent, in degrees"),
        QT_TR_NOOP("Evaluations so far (value + gradient + Hessian)"),
        QT_TR_NOOP("What the method noted about this step")};
    if (section < 0 || section >= ColumnCount) return {};
    if (role == Qt::DisplayRole) return tr(titles[section]);
    if (role == Qt::ToolTipRole) return tr(tips[section]);
    return {};
}

QString StepsModel::toCsv(const Snapshot& snapshot) {
    QString out = QStringLiteral(
        "method,label,iteration,value,gradient_norm,step_kind,accepted,step_length,step_norm,trust_radius,ratio,"
        "damping,damping_name,eigenvalue_min,eigenvalue_max,condition_number,angle_degrees,value_evaluations,"
        "gradient_evaluations,hessian_evaluations,note");
    const int n = snapshot.objective ? snapshot.objective->dimension() : 0;
    for (int i = 0; i < n; ++i) {
        const QString name = i < static_cast<int>(snapshot.variableNames.size())
                                 ? snapshot.variableNames[static_cast<std::size_t>(i)]
                                 : QStringLiteral("x%1").arg(i + 1);
        out += ',' + csvText(name);
    }
    out += '\n';
    for (const RunTrack& track : snapshot.tracks) {
        if (!track.run) continue;
        for (const auto& r : track.run->trace) {
            QStringList cells;
            cells << csvText(QString::fromStdString(track.run->methodId)) << csvText(track.label)
                  << QString::number(r.iteration) << csvNumber(r.value) << csvNumber(r.gradientNorm)
                  << (r.stepKind == solve::StepKind::None ? QString() : QString::fromLatin1(solve::toString(r.stepKind)))
                  << (r.accepted ? "true" : "false") << csvNumber(r.stepLength) << csvNumber(r.stepNorm)
                  << csvNumber(r.trustRadius) << csvNumber(r.ratio) << csvNumber(r.damping)
                  << csvText(QString::fromStdString(r.dampingName)) << csvNumber(eigenMin(r)) << csvNumber(eigenMax(r))
                  << csvNumber(r.conditionNumber) << csvNumber(r.angleToSteepestDescent())
                  << QString::number(r.evaluations.value) << QString::number(r.evaluations.gradient)
                  << QString::number(r.evaluations.hessian) << csvText(QString::fromStdString(r.note.text()));
            for (int i = 0; i < n; ++i) cells << (i < r.x.size() ? csvNumber(r.x(i)) : QString());
            out += cells.join(',') + '\n';
        }
    }
    return out;
}

StepsTable::StepsTable(QWidget* parent) : QWidget(parent) {
    tabs_ = new QTabBar(this);
    tabs_->setExpanding(false);
    tabs_->setDocumentMode(true);
    tabs_->setToolTip(tr("Show the steps of every method, or of one lineup entry"));
    tabs_->addTab(tr("All methods"));
    view_ = new QTableView(this);
    model_ = new StepsModel(this);
    view_->setModel(model_);
    view_->setSelectionBehavior(QAbstractItemView::SelectRows);
    view_->setSelectionMode(QAbstractItemView::SingleSelection);
    view_->setAlternatingRowColors(true);
    view_->verticalHeader()->setVisible(false);
    view_->verticalHeader()->setDefaultSectionSize(view_->fontMetrics().height() + 6);
    view_->horizontalHeader()->setStretchLastSection(true);
    view_->setToolTip(tr("One row per iterate; select a row to show that iterate in every view"));
    summary_ = new QLabel(this);
    summary_->setWordWrap(true);
    summary_->setToolTip(tr("How the selected entry's run ended"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->setSpacing(2);
    layout->addWidget(tabs_);
    layout->addWidget(view_, 1);
    layout->addWidget(summary_);
    connect(tabs_, &QTabBar::currentChanged, this, &StepsTable::onTabChanged);
    connect(view_->selectionModel(), &QItemSelectionModel::currentRowChanged, this, [this] { onRowChanged(); });
}

void StepsTable::setSnapshot(std::shared_ptr<const Snapshot> snapshot) {
    updating_ = true;
    snapshot_ = std::move(snapshot);
    const int tracks = snapshot_ ? static_cast<int>(snapshot_->tracks.size()) : 0;
    int current = tabs_->currentIndex();
    while (tabs_->count() > tracks + 1) tabs_->removeTab(tabs_->count() - 1);
    for (int t = 0; t < tracks; ++t) {
        const RunTrack& track = snapshot_->tracks[static_cast<std::size_t>(t)];
        QPixmap swatch(12, 12);
        swatch.fill(track.colour);
        if (t + 1 < tabs_->count()) {
            tabs_->setTabText(t + 1, track.label);
            tabs_->setTabIcon(t + 1, QIcon(swatch));
        } else {
            tabs_->addTab(QIcon(swatch), track.label);
        }
        tabs_->setTabToolTip(t + 1, tr("Steps of %1 only").arg(track.label));
    }
    if (current > tracks) current = 0;
    tabs_->setCurrentIndex(current < 0 ? 0 : current);
    model_->setTrackFilter(tabs_->currentIndex() - 1);
    model_->setSnapshot(snapshot_);
    view_->resizeColumnsToContents();
    updating_ = false;
    showSelection();
}

void StepsTable::setSelection(const Selection& selection) {
    selection_ = selection;
    if (selection.valid() && model_->trackFilter() >= 0 && model_->trackFilter() != selection.track) {
        updating_ = true;
        tabs_->setCurrentIndex(selection.track + 1);
        model_->setTrackFilter(selection.track);
        updating_ = false;
    }
    showSelection();
}

void StepsTable::onTabChanged(int index) {
    if (updating_) return;
    model_->setTrackFilter(index - 1);
    showSelection();
}

void StepsTable::onRowChanged() {
    if (updating_) return;
    const Selection s = model_->selectionAt(view_->selectionModel()->currentIndex().row());
    if (!s.valid() || s == selection_) return;
    selection_ = s;
    showSelection();
    emit selectionRequested(s);
}

void StepsTable::showSelection() {
    updating_ = true;
    const int row = model_->rowOf(selection_);
    if (row >= 0) {
        const QModelIndex index = model_->index(row, StepsModel::Iteration);
        view_->selectionModel()->setCurrentIndex(index,
                                                 QItemSelectionModel::ClearAndSelect | QItemSelectionModel::Rows);
        view_->scrollTo(index);
    } else {
        view_->selectionModel()->clearSelection();
    }
    QString text;
    if (snapshot_ && selection_.valid() && selection_.track < static_cast<int>(snapshot_->tracks.size())) {
        const RunTrack& track = snapshot_->tracks[static_cast<std::size_t>(selection_.track)];
        if (track.run && track.run->finished())
            text = tr("%1: %2 after %n iteration(s). %3", nullptr, track.run->iterations())
                       .arg(track.label, QString::fromLatin1(solve::toString(track.run->termination)),
                            QString::fromStdString(track.run->message));
    }
    summary_->setText(text);
    summary_->setVisible(!text.isEmpty());
    updating_ = false;
}

}  // namespace sw::widgets
