#pragma once
// The steps table: every run's iteration records as a table (model/view), one tab per
// lineup entry plus an "All methods" tab. Selecting a row selects that iterate everywhere;
// setSelection() (from a click on a plot) selects its row.

#include "widgets/snapshot.h"

#include <QAbstractTableModel>
#include <QWidget>
#include <memory>
#include <vector>

class QTabBar;
class QTableView;
class QLabel;

namespace sw::widgets {

class StepsModel : public QAbstractTableModel {
    Q_OBJECT
public:
    enum Column {
        Method,
        Iteration,
        Value,
        GradientNorm,
        StepKindColumn,
        StepLength,
        TrustRadius,
        Ratio,
        Damping,
        EigenMin,
        EigenMax,
        Condition,
        Angle,
        Evaluations,
        Note,
        ColumnCount
    };

    explicit StepsModel(QObject* parent = nullptr);

    void setSnapshot(std::shared_ptr<const Snapshot> snapshot);
    // -1: rows of every track; otherwise only that track's rows.
    void setTrackFilter(int track);
    int trackFilter() const { return filter_; }

    int rowCount(const QModelIndex& parent = {}) const override;
    int columnCount(const QModelIndex& parent = {}) const override;
    QVariant data(const QModelIndex& index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;

    // Row <-> iterate. rowOf returns -1 when the iterate is not shown under the filter.
    Selection selectionAt(int row) const;
    int rowOf(const Selection& selection) const;

    // Every track's records as CSV (C locale, 17 significant digits, empty cells for
    // quantities a method does not have). Header names are plain snake_case words.
    static QString toCsv(const Snapshot& snapshot);

private:
    void rebuildRows();
    std::shared_ptr<const Snapshot> snapshot_;
    int filter_ = -1;
    std::vector<Selection> rows_;
};

class StepsTable : public QWidget {
    Q_OBJECT
public:
    explicit StepsTable(QWidget* parent = nullptr);
    void setSnapshot(std::shared_ptr<const Snapshot> snapshot);
    void setSelection(const Selection& selection);
    Selection selection() const { return selection_; }
    StepsModel* model() const { return model_; }
    QTableView* view() const { return view_; }
    QTabBar* tabs() const { return tabs_; }

signals:
    void selectionRequested(const sw::widgets::Selection& selection);

private:
    void onTabChanged(int index);
    void onRowChanged();
    void showSelection();
    QTabBar* tabs_ = nullptr;
    QTableView* view_ = nullptr;
    QLabel* summary_ = nullptr;
    StepsModel* model_ = nullptr;
    std::shared_ptr<const Snapshot> snapshot_;
    Selection selection_;
    bool updating_ = false;
};

}  // namespace sw::widgets
