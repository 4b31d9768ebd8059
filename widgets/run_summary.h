#pragma once
// The runs side by side: one row per lineup entry with how it ended (termination and the
// method's own message, so a run that failed says why), the value, gradient norm and kind of
// point it ended on, iterations and evaluations; the rows the `run` verb prints, in the window.
// Selecting a row selects that run's last iterate everywhere.

#include "widgets/snapshot.h"

#include <QAbstractTableModel>
#include <QWidget>
#include <memory>

class QLabel;
class QTableView;

namespace sw::widgets {

class RunSummaryModel : public QAbstractTableModel {
    Q_OBJECT
public:
    enum Column { Label, Ended, Value, GradientNorm, EndPoint, Iterations, Evaluations, Message, ColumnCount };

    explicit RunSummaryModel(QObject* parent = nullptr);
    void setSnapshot(std::shared_ptr<const Snapshot> snapshot);

    int rowCount(const QModelIndex& parent = {}) const override;
    int columnCount(const QModelIndex& parent = {}) const override;
    QVariant data(const QModelIndex& index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;

    // The kind of point a run ended on, as the summary shows it ("minimum", "saddle (index 1)",
    // "not stationary; curvature: minimum", "" while running or when unknown).
    static QString endPointText(const solve::Run& run);
    // A run that broke down (non-finite values, a method failure, rejected options).
    static bool failed(const solve::Run& run);

private:
    std::shared_ptr<const Snapshot> snapshot_;
};

class RunSummary : public QWidget {
    Q_OBJECT
public:
    explicit RunSummary(QWidget* parent = nullptr);
    void setSnapshot(std::shared_ptr<const Snapshot> snapshot);
    RunSummaryModel* model() const { return model_; }
    QTableView* view() const { return view_; }
    // The line above the table: counts, and when every run failed, why.
    QString headline() const;

signals:
    void selectionRequested(const sw::widgets::Selection& selection);

private:
    QLabel* headline_ = nullptr;
    QTableView* view_ = nullptr;
    RunSummaryModel* model_ = nullptr;
    std::shared_ptr<const Snapshot> snapshot_;
};

}  // namespace sw::widgets
