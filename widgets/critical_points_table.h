#pragma once
// The critical-point map as a table (model/view): kind, coordinates, f, |grad f|, Hessian
// eigenvalues and how many starts reached each point. Selecting a row highlights the point on
// the landscape; a double click (or Enter) asks for a run from near it.

#include "core/survey/survey.h"

#include <QAbstractTableModel>
#include <QWidget>
#include <memory>

class QTableView;

namespace sw::widgets {

class CriticalPointsModel : public QAbstractTableModel {
    Q_OBJECT
public:
    explicit CriticalPointsModel(QObject* parent = nullptr);
    void setMap(std::shared_ptr<const survey::CriticalMap> map);
    const survey::CriticalMap* map() const { return map_.get(); }

    int rowCount(const QModelIndex& parent = {}) const override;
    int columnCount(const QModelIndex& parent = {}) const override;
    QVariant data(const QModelIndex& index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;

    // Column layout: #, kind, one per variable, f, |grad f|, eigenvalues, hits.
    int variableCount() const;

private:
    std::shared_ptr<const survey::CriticalMap> map_;
};

// Plain-text kind with its detail: "saddle (index 1)", "degenerate: set of 37 points".
QString kindText(const survey::CriticalPoint& point);

class CriticalPointsTable : public QWidget {
    Q_OBJECT
public:
    explicit CriticalPointsTable(QWidget* parent = nullptr);
    void setMap(std::shared_ptr<const survey::CriticalMap> map);
    void selectPoint(int point);  // -1 clears
    int selectedPoint() const;
    CriticalPointsModel* model() const { return model_; }
    QTableView* view() const { return view_; }

signals:
    void pointSelected(int point);   // -1 when the selection is cleared
    void pointActivated(int point);  // double click or Enter

private:
    QTableView* view_ = nullptr;
    CriticalPointsModel* model_ = nullptr;
    bool updating_ = false;
};

}  // namespace sw::widgets
