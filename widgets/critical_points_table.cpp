#include "widgets/critical_points_table.h"

#include "widgets/plot_style.h"

#include <QHeaderView>
#include <QTableView>
#include <QVBoxLayout>

namespace sw::widgets {

QString kindText(const survey::CriticalPoint& p) {
    switch (p.kind) {
        case solve::PointKind::Minimum:
            return QObject::tr("local minimum");
        case solve::PointKind::Maximum:
            return QObject::tr("local maximum");
        case solve::PointKind::Saddle:
            return QObject::tr("saddle (index %1)").arg(p.index);
        case solve::PointKind::Degenerate:
            return p.continuum ? QObject::tr("degenerate: set of %1 points").arg(p.members) : QObject::tr("degenerate");
        default:
            return QObject::tr("unclassified");
    }
}

CriticalPointsModel::CriticalPointsModel(QObject* parent) : QAbstractTableModel(parent) {}

void CriticalPointsModel::setMap(std::shared_ptr<const survey::CriticalMap> map) {
    beginResetModel();
    map_ = std::move(map);
    endResetModel();
}

int CriticalPointsModel::variableCount() const { return map_ ? static_cast<int>(map_->variables.size()) : 0; }

int CriticalPointsModel::rowCount(const QModelIndex& parent) const {
    return parent.isValid() || !map_ ? 0 : static_cast<int>(map_->points.size());
}

int CriticalPointsModel::columnCount(const QModelIndex& parent) const {
    return parent.isValid() ? 0 : 2 + variableCount() + 4;
}

QVariant CriticalPointsModel::headerData(int section, Qt::Orientation orientation, int role) const {
    if (orientation != Qt::Horizontal) return {};
    const int n = variableCount();
    if (role == Qt::ToolTipRole) {
        if (section == 1) return tr("By the Hessian's eigenvalues; a saddle's index is how many are negative");
        if (section == 2 + n + 1) return tr("Gradient norm where the point was refined to (rounding level)");
        if (section == 2 + n + 3) return tr("How many starts of the search reached this point (1: more may be missing)");
        return {};
    }
    if (role != Qt::DisplayRole) return {};
    if (section == 0) return QStringLiteral("#");
    if (section == 1) return tr("kind");
    if (section < 2 + n) return QString::fromStdString(map_->variables[static_cast<std::size_t>(section - 2)]);
    switch (section - 2 - n) {
        case 0:
            return tr("f");
        case 1:
            return tr("|∇f|");
        case 2:
            return tr("eigenvalues");
        case 3:
            return tr("starts");
        default:
            return {};
    }
}

QVariant CriticalPointsModel::data(const QModelIndex& index, int role) const {
    if (!map_ || !index.isValid() || index.row() >= rowCount()) return {};
    const survey::CriticalPoint& p = map_->points[static_cast<std::size_t>(index.row())];
    const int n = variableCount();
    const int c = index.column();
    if (role == Qt::TextAlignmentRole)
        return c == 1 || c == 2 + n + 2 ? QVariant(Qt::AlignLeft | Qt::AlignVCenter) : QVariant(Qt::AlignRight | Qt::AlignVCenter);
    if (role == Qt::ToolTipRole && c == 1 && p.foundBy == "basins")
        return tr("First met by a basin run: the search's starts missed it");
    if (role != Qt::DisplayRole) return {};
    if (c == 0) return index.row();
    if (c == 1) return kindText(p) + (p.foundBy == "basins" ? QStringLiteral(" *") : QString());
    if (c < 2 + n) return formatNumber(p.x[c - 2], 6);
    switch (c - 2 - n) {
        case 0:
            return formatNumber(p.value, 6);
        case 1:
            return formatNumber(p.gradientNorm, 2);
        case 2: {
            QStringList values;
            for (Eigen::Index i = 0; i < p.eigenvalues.size() && i < 6; ++i) values << formatNumber(p.eigenvalues[i], 4);
            if (p.eigenvalues.size() > 6) values << QStringLiteral("…");
            return values.join(QStringLiteral(", "));
        }
        case 3:
            return p.hits;
        default:
            return {};
    }
}

CriticalPointsTable::CriticalPointsTable(QWidget* parent) : QWidget(parent) {
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    model_ = new CriticalPointsModel(this);
    view_ = new QTableView(this);
    view_->setObjectName(QStringLiteral("criticalPointsTable"));
    view_->setModel(model_);
    view_->setSelectionBehavior(QAbstractItemView::SelectRows);
    view_->setSelectionMode(QAbstractItemView::SingleSelection);
    view_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    view_->verticalHeader()->setVisible(false);
    view_->horizontalHeader()->setStretchLastSection(true);
    view_->setToolTip(tr("Double-click a point (or press Enter) to run the methods from near it"));
    layout->addWidget(view_);
    connect(view_->selectionModel(), &QItemSelectionModel::selectionChanged, this, [this] {
        if (!updating_) emit pointSelected(selectedPoint());
    });
    connect(view_, &QTableView::activated, this, [this](const QModelIndex& index) {
        if (index.isValid()) emit pointActivated(index.row());
    });
}

void CriticalPointsTable::setMap(std::shared_ptr<const survey::CriticalMap> map) {
    updating_ = true;
    model_->setMap(std::move(map));
    view_->resizeColumnsToContents();
    updating_ = false;
}

void CriticalPointsTable::selectPoint(int point) {
    updating_ = true;
    if (point < 0 || point >= model_->rowCount())
        view_->clearSelection();
    else
        view_->selectRow(point);
    updating_ = false;
}

int CriticalPointsTable::selectedPoint() const {
    const QModelIndexList rows = view_->selectionModel()->selectedRows();
    return rows.isEmpty() ? -1 : rows.front().row();
}

}  // namespace sw::widgets
