#include "widgets/run_summary.h"

#include "widgets/plot_style.h"
#include "widgets/theme.h"

#include <QGuiApplication>
#include <QHeaderView>
#include <QItemSelectionModel>
#include <QLabel>
#include <QTableView>
#include <QVBoxLayout>
#include <cmath>

namespace sw::widgets {

RunSummaryModel::RunSummaryModel(QObject* parent) : QAbstractTableModel(parent) {}

void RunSummaryModel::setSnapshot(std::shared_ptr<const Snapshot> snapshot) {
    beginResetModel();
    snapshot_ = std::move(snapshot);
    endResetModel();
}

int RunSummaryModel::rowCount(const QModelIndex& parent) const {
    return parent.isValid() || !snapshot_ ? 0 : static_cast<int>(snapshot_->tracks.size());
}

int RunSummaryModel::columnCount(const QModelIndex& parent) const { return parent.isValid() ? 0 : ColumnCount; }

bool RunSummaryModel::failed(const solve::Run& run) {
    return run.termination == solve::Termination::Failed || run.termination == solve::Termination::NonFinite;
}

QString RunSummaryModel::endPointText(const solve::Run& run) {
    if (!run.finished() || run.endPoint.kind == solve::PointKind::Unknown) return {};
    QString text = QString::fromUtf8(solve::toString(run.endPoint.kind));
    if (run.endPoint.kind == solve::PointKind::Saddle) text += QObject::tr(" (index %1)").arg(run.endPoint.index);
    if (!run.endPoint.critical) text = QObject::tr("not stationary; curvature: %1").arg(text);
    return text;
}

QVariant RunSummaryModel::data(const QModelIndex& index, int role) const {
    if (!snapshot_ || !index.isValid() || index.row() >= static_cast<int>(snapshot_->tracks.size())) return {};
    const RunTrack& track = snapshot_->tracks[static_cast<std::size_t>(index.row())];
    if (!track.run) return {};
    const solve::Run& run = *track.run;
    if (role == Qt::DecorationRole && index.column() == Label) return track.colour;
    if (role == Qt::ToolTipRole) {
        QString tip = QStringLiteral("%1 (%2)").arg(track.label, QString::fromStdString(run.methodId));
        if (!run.message.empty()) tip += QStringLiteral("\n") + QString::fromStdString(run.message);
        return tip;
    }
    if (role == Qt::ForegroundRole && failed(run) && (index.column() == Ended || index.column() == Message))
        return problemTextColour(QGuiApplication::palette());
    if (role == Qt::TextAlignmentRole) {
        switch (index.column()) {
        case Value:
        case GradientNorm:
        case Iterations:
        case Evaluations: return int(Qt::AlignRight | Qt::AlignVCenter);
        default: return int(Qt::AlignLeft | Qt::AlignVCenter);
        }
    }
    if (role != Qt::DisplayRole) return {};
    switch (index.column()) {
    case Label: return track.label;
    case Ended: return run.finished() ? QString::fromUtf8(solve::toString(run.termination)) : tr("running");
    case Value: return std::isnan(run.value) ? QString() : formatNumber(run.value, 10);
    case GradientNorm: return std::isnan(run.gradientNorm) ? QString() : formatNumber(run.gradientNorm, 3);
    case EndPoint: return endPointText(run);
    case Iterations: return run.iterations();
    case Evaluations:
        return QStringLiteral("%1/%2/%3").arg(run.evaluations.value).arg(run.evaluations.gradient).arg(run.evaluations.hessian);
    case Message: return QString::fromStdString(run.message);
    default: return {};
    }
}

QVariant RunSummaryModel::headerData(int section, Qt::Orientation orientation, int role) const {
    if (orientation != Qt::Horizontal) return {};
    static const char* titles[] = {QT_TR_NOOP("Method"),     QT_TR_NOOP("Ended"),      QT_TR_NOOP("f at end"),
                                   QT_TR_NOOP("|∇f| at end"), QT_TR_NOOP("End point"),  QT_TR_NOOP("Iterations"),
                                   QT_TR_NOOP("Evaluations"), QT_TR_NOOP("Why it ended")};
    static const char* tips[] = {
        QT_TR_NOOP("The lineup entry"),
        QT_TR_NOOP("How the run ended: a tolerance met, a limit reached, or a breakdown"),
        QT_TR_NOOP("The objective at the last iterate"),
        QT_TR_NOOP("Length of the gradient at the last iterate"),
        QT_TR_NOOP("The kind of point the run ended on, from the Hessian's eigenvalues"),
        QT_TR_NOOP("Iterations taken"),
        QT_TR_NOOP("Evaluations of value / gradient / Hessian"),
        QT_TR_NOOP("The method's own sentence on how it ended")};
    if (section < 0 || section >= ColumnCount) return {};
    if (role == Qt::DisplayRole) return tr(titles[section]);
    if (role == Qt::ToolTipRole) return tr(tips[section]);
    return {};
}

RunSummary::RunSummary(QWidget* parent) : QWidget(parent) {
    headline_ = new QLabel(this);
    headline_->setWordWrap(true);
    headline_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    headline_->setToolTip(tr("How many runs converged, stopped at a limit or failed"));
    model_ = new RunSummaryModel(this);
    view_ = new QTableView(this);
    view_->setModel(model_);
    view_->setSelectionBehavior(QAbstractItemView::SelectRows);
    view_->setSelectionMode(QAbstractItemView::SingleSelection);
    view_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    view_->verticalHeader()->setVisible(false);
    view_->horizontalHeader()->setStretchLastSection(true);
    view_->setWordWrap(false);
    view_->setToolTip(tr("Every method's run side by side; select a row to select its last iterate"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(4, 4, 4, 4);
    layout->addWidget(headline_);
    layout->addWidget(view_, 1);
    connect(view_->selectionModel(), &QItemSelectionModel::currentRowChanged, this, [this](const QModelIndex& current) {
        if (!current.isValid() || !snapshot_ || current.row() >= static_cast<int>(snapshot_->tracks.size())) return;
        const auto& run = snapshot_->tracks[static_cast<std::size_t>(current.row())].run;
        if (run && !run->trace.empty())
            emit selectionRequested(Selection{current.row(), static_cast<int>(run->trace.size()) - 1});
    });
}

void RunSummary::setSnapshot(std::shared_ptr<const Snapshot> snapshot) {
    snapshot_ = std::move(snapshot);
    {
        const QSignalBlocker quiet(view_->selectionModel());
        model_->setSnapshot(snapshot_);
    }
    view_->resizeColumnsToContents();
    int converged = 0, limits = 0, failed = 0, running = 0;
    QString firstFailure;
    if (snapshot_)
        for (const RunTrack& track : snapshot_->tracks) {
            if (!track.run) continue;
            const solve::Run& run = *track.run;
            if (!run.finished())
                ++running;
            else if (solve::isConvergence(run.termination))
                ++converged;
            else if (RunSummaryModel::failed(run)) {
                ++failed;
                if (firstFailure.isEmpty()) firstFailure = QString::fromStdString(run.message);
            } else
                ++limits;
        }
    const int count = snapshot_ ? static_cast<int>(snapshot_->tracks.size()) : 0;
    QString text;
    if (count == 0) {
        text = tr("No runs yet.");
    } else if (failed == count) {
        // Every run broke down: the reason is usually the same for all (a start where f is not finite).
        text = tr("Every method failed. %1").arg(firstFailure);
    } else {
        text = tr("%1 converged, %2 stopped at a limit, %3 failed").arg(converged).arg(limits).arg(failed);
        if (running > 0) text += tr(", %1 still running").arg(running);
    }
    headline_->setText(text);
    headline_->setStyleSheet(failed > 0 && failed == count ? problemTextStyle(palette()) : QString());
}

QString RunSummary::headline() const { return headline_->text(); }

}  // namespace sw::widgets
