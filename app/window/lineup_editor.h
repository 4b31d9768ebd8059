#pragma once
// The method lineup: entries from the solver registry, each with a label, colour, marker,
// enabled flag and options (checked against the method's specs as they are typed).
// Several entries may use the same method with different options.

#include "core/study/study.h"

#include <QWidget>
#include <vector>

class QComboBox;
class QLabel;
class QLineEdit;
class QListWidget;
class QPushButton;
class QTableWidget;
class QToolButton;

namespace sw::window {

class LineupEditor : public QWidget {
    Q_OBJECT
public:
    explicit LineupEditor(QWidget* parent = nullptr);

    void setEntries(const std::vector<study::MethodEntry>& entries);
    const std::vector<study::MethodEntry>& entries() const { return entries_; }
    // "" when the entry's options are valid, else the sentence from solve::checkOptions.
    static std::string problem(const study::MethodEntry& entry);

    void addMethod(const std::string& methodId);
    void removeEntry(int index);
    void moveEntry(int index, int delta);
    void setEnabled(int index, bool enabled);
    void setOption(int index, const std::string& name, const std::string& value);
    int currentEntry() const;
    void setCurrentEntry(int index);
    QListWidget* list() const { return list_; }
    QLabel* messageLabel() const { return message_; }

signals:
    void edited();

protected:
    void changeEvent(QEvent* event) override;

private:
    void refreshList();
    void refreshDetails();
    void onItemChanged();
    void onDetailsEdited();
    void chooseColour();
    QString uniqueLabel(const QString& base) const;

    std::vector<study::MethodEntry> entries_;
    QListWidget* list_ = nullptr;
    QToolButton* add_ = nullptr;
    QPushButton* duplicate_ = nullptr;
    QPushButton* remove_ = nullptr;
    QToolButton* up_ = nullptr;
    QToolButton* down_ = nullptr;
    QWidget* details_ = nullptr;
    QLineEdit* label_ = nullptr;
    QLabel* method_ = nullptr;
    QPushButton* colour_ = nullptr;
    QComboBox* marker_ = nullptr;
    QTableWidget* options_ = nullptr;
    QLabel* message_ = nullptr;
    bool updating_ = false;
};

}  // namespace sw::window
