#include "app/window/lineup_editor.h"

#include "app/window/method_names.h"

#include "core/solve/solver.h"
#include "widgets/theme.h"

#include <QColorDialog>
#include <QComboBox>
#include <QEvent>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QListWidget>
#include <QMenu>
#include <QPainter>
#include <QPainterPath>
#include <QPushButton>
#include <QTableWidget>
#include <QToolButton>
#include <QVBoxLayout>
#include <map>
#include <set>

namespace sw::window {

namespace {

enum OptionColumn { OptionName, OptionValue, OptionAllowed, OptionColumnCount };

// A swatch with the entry's marker in its colour, as lists and tabs show it.
QIcon entryIcon(const QColor& colour, widgets::Marker marker) {
    QPixmap pixmap(32, 32);
    pixmap.fill(Qt::transparent);
    QPainter p(&pixmap);
    p.setRenderHint(QPainter::Antialiasing);
    p.setPen(QPen(colour, 3));
    p.setBrush(colour.lighter(150));
    const QRectF r(6, 6, 20, 20);
    QPainterPath path;
    switch (marker) {
    case widgets::Marker::Circle: p.drawEllipse(r); break;
    case widgets::Marker::Square: p.drawRect(r); break;
    case widgets::Marker::Triangle: p.drawPolygon(QPolygonF({{16, 5}, {27, 26}, {5, 26}})); break;
    case widgets::Marker::Diamond: p.drawPolygon(QPolygonF({{16, 4}, {28, 16}, {16, 28}, {4, 16}})); break;
    case widgets::Marker::Cross:
        p.drawLine(QPointF(7, 7), QPointF(25, 25));
        p.drawLine(QPointF(25, 7), QPointF(7, 25));
        break;
    case widgets::Marker::Plus:
        p.drawLine(QPointF(16, 5), QPointF(16, 27));
        p.drawLine(QPointF(5, 16), QPointF(27, 16));
        break;
    case widgets::Marker::Star:
        p.drawLine(QPointF(16, 5), QPointF(16, 27));
        p.drawLine(QPointF(6, 10), QPointF(26, 22));
        p.drawLine(QPointF(26, 10), QPointF(6, 22));
        break;
    }
    return QIcon(pixmap);
}

}  // namespace

LineupEditor::LineupEditor(QWidget* parent) : QWidget(parent) {
    list_ = new QListWidget(this);
    list_->setToolTip(tr("The methods to run side by side; tick to enable, select to edit"));
    list_->setIconSize(QSize(18, 18));
    list_->setDragDropMode(QAbstractItemView::NoDragDrop);

    add_ = new QToolButton(this);
    add_->setText(tr("Add"));
    add_->setToolTip(tr("Add a method from the catalogue"));
    add_->setPopupMode(QToolButton::InstantPopup);
    auto* menu = new QMenu(add_);
    std::map<std::string, QMenu*> families;
    for (const auto& info : solve::methods()) {
        QMenu*& sub = families[info.family];
        if (!sub) sub = menu->addMenu(QString::fromStdString(info.family));
        QAction* action = sub->addAction(QStringLiteral("%1  (%2)").arg(methodDisplayName(info.id),
                                                                         QString::fromStdString(info.id)));
        action->setToolTip(QString::fromStdString(info.summary));
        action->setStatusTip(QString::fromStdString(info.summary));
        const std::string id = info.id;
        connect(action, &QAction::triggered, this, [this, id] { addMethod(id); });
    }
    menu->setToolTipsVisible(true);
    add_->setMenu(menu);
    duplicate_ = new QPushButton(tr("Copy"), this);
    duplicate_->setToolTip(tr("Add a copy of the selected entry (to compare options of one method)"));
    remove_ = new QPushButton(tr("Remove"), this);
    remove_->setToolTip(tr("Remove the selected entry"));
    up_ = new QToolButton(this);
    up_->setArrowType(Qt::UpArrow);
    up_->setText(tr("Up"));
    up_->setToolTip(tr("Move the selected entry up"));
    down_ = new QToolButton(this);
    down_->setArrowType(Qt::DownArrow);
    down_->setText(tr("Down"));
    down_->setToolTip(tr("Move the selected entry down"));
    connect(duplicate_, &QPushButton::clicked, this, [this] {
        const int i = currentEntry();
        if (i < 0) return;
        study::MethodEntry copy = entries_[static_cast<std::size_t>(i)];
        copy.label = uniqueLabel(QString::fromStdString(copy.label)).toStdString();
        const int n = static_cast<int>(entries_.size());
        copy.colour = widgets::lineupColour(n).name().toStdString();
        copy.marker = widgets::markerName(widgets::lineupMarker(n)).toStdString();
        entries_.insert(entries_.begin() + i + 1, copy);
        refreshList();
        setCurrentEntry(i + 1);
        emit edited();
    });
    connect(remove_, &QPushButton::clicked, this, [this] { removeEntry(currentEntry()); });
    connect(up_, &QToolButton::clicked, this, [this] { moveEntry(currentEntry(), -1); });
    connect(down_, &QToolButton::clicked, this, [this] { moveEntry(currentEntry(), +1); });
    connect(list_, &QListWidget::currentRowChanged, this, [this] { refreshDetails(); });
    connect(list_, &QListWidget::itemChanged, this, [this] { onItemChanged(); });

    details_ = new QWidget(this);
    label_ = new QLineEdit(details_);
    label_->setToolTip(tr("Name shown in legends, tabs and tables"));
    method_ = new QLabel(details_);
    method_->setWordWrap(true);
    method_->setToolTip(tr("The method this entry runs"));
    colour_ = new QPushButton(details_);
    colour_->setToolTip(tr("Colour of this entry's path and curves"));
    marker_ = new QComboBox(details_);
    marker_->setToolTip(tr("Marker drawn at each iterate of this entry"));
    for (widgets::Marker m : widgets::lineupMarkers()) marker_->addItem(widgets::markerName(m));
    options_ = new QTableWidget(0, OptionColumnCount, details_);
    options_->setHorizontalHeaderLabels({tr("Option"), tr("Value"), tr("Allowed")});
    options_->horizontalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
    options_->horizontalHeader()->setStretchLastSection(true);
    options_->verticalHeader()->setVisible(false);
    options_->setToolTip(tr("The method's options; empty means the default. Hover a name for its meaning."));
    message_ = new QLabel(details_);
    message_->setWordWrap(true);
    message_->setStyleSheet(widgets::problemTextStyle(palette()));
    message_->setToolTip(tr("Why this entry's options cannot be used"));
    connect(label_, &QLineEdit::editingFinished, this, [this] { onDetailsEdited(); });
    connect(marker_, &QComboBox::currentIndexChanged, this, [this] { onDetailsEdited(); });
    connect(colour_, &QPushButton::clicked, this, &LineupEditor::chooseColour);
    connect(options_, &QTableWidget::itemChanged, this, [this] { onDetailsEdited(); });

    auto* form = new QFormLayout(details_);
    form->setContentsMargins(0, 0, 0, 0);
    form->addRow(tr("Label"), label_);
    form->addRow(tr("Method"), method_);
    auto* look = new QHBoxLayout;
    look->addWidget(colour_);
    look->addWidget(marker_, 1);
    form->addRow(tr("Colour, marker"), look);
    form->addRow(options_);
    form->addRow(message_);

    auto* buttons = new QHBoxLayout;
    buttons->addWidget(add_);
    buttons->addWidget(duplicate_);
    buttons->addWidget(remove_);
    buttons->addStretch(1);
    buttons->addWidget(up_);
    buttons->addWidget(down_);
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(4, 4, 4, 4);
    layout->addLayout(buttons);
    layout->addWidget(list_, 3);
    layout->addWidget(details_, 2);
    refreshDetails();
}

std::string LineupEditor::problem(const study::MethodEntry& entry) {
    const solve::MethodInfo* info = solve::findMethod(entry.method);
    if (!info) return "unknown method '" + entry.method + "'; known: " + solve::methodIdList();
    return solve::checkOptions(info->options, entry.options);
}

void LineupEditor::setEntries(const std::vector<study::MethodEntry>& entries) {
    entries_ = entries;
    refreshList();
    setCurrentEntry(entries_.empty() ? -1 : 0);
}

QString LineupEditor::uniqueLabel(const QString& base) const {
    std::set<std::string> used;
    for (const auto& e : entries_) used.insert(e.label);
    if (!used.count(base.toStdString())) return base;
    for (int k = 2;; ++k) {
        const QString candidate = QStringLiteral("%1 (%2)").arg(base).arg(k);
        if (!used.count(candidate.toStdString())) return candidate;
    }
}

void LineupEditor::addMethod(const std::string& methodId) {
    study::MethodEntry entry;
    entry.method = methodId;
    entry.label = uniqueLabel(methodDisplayName(methodId)).toStdString();
    const int n = static_cast<int>(entries_.size());
    entry.colour = widgets::lineupColour(n).name().toStdString();
    entry.marker = widgets::markerName(widgets::lineupMarker(n)).toStdString();
    entries_.push_back(entry);
    refreshList();
    setCurrentEntry(n);
    emit edited();
}

void LineupEditor::removeEntry(int index) {
    if (index < 0 || index >= static_cast<int>(entries_.size())) return;
    entries_.erase(entries_.begin() + index);
    refreshList();
    setCurrentEntry(std::min(index, static_cast<int>(entries_.size()) - 1));
    emit edited();
}

void LineupEditor::moveEntry(int index, int delta) {
    const int to = index + delta;
    const int n = static_cast<int>(entries_.size());
    if (index < 0 || index >= n || to < 0 || to >= n) return;
    std::swap(entries_[static_cast<std::size_t>(index)], entries_[static_cast<std::size_t>(to)]);
    refreshList();
    setCurrentEntry(to);
    emit edited();
}

void LineupEditor::setEnabled(int index, bool enabled) {
    if (index < 0 || index >= static_cast<int>(entries_.size())) return;
    entries_[static_cast<std::size_t>(index)].enabled = enabled;
    refreshList();
    emit edited();
}

void LineupEditor::setOption(int index, const std::string& name, const std::string& value) {
    if (index < 0 || index >= static_cast<int>(entries_.size())) return;
    auto& options = entries_[static_cast<std::size_t>(index)].options;
    if (value.empty())
        options.erase(name);
    else
        options[name] = value;
    refreshList();
    if (index == currentEntry()) refreshDetails();
    emit edited();
}

int LineupEditor::currentEntry() const { return list_->currentRow(); }

void LineupEditor::setCurrentEntry(int index) {
    list_->setCurrentRow(index);
    refreshDetails();
}

void LineupEditor::refreshList() {
    const bool wasUpdating = updating_;
    updating_ = true;
    // Rebuilding the list moves its current row through -1 and back; the details (and the
    // option table whose cell may be open in an editor) must not be rebuilt on the way.
    const QSignalBlocker quiet(list_);
    const int current = list_->currentRow();
    list_->clear();
    for (const auto& e : entries_) {
        bool ok = false;
        const widgets::Marker marker = widgets::markerFromName(QString::fromStdString(e.marker), &ok);
        auto* item = new QListWidgetItem(entryIcon(QColor(QString::fromStdString(e.colour)), marker),
                                         QString::fromStdString(e.label), list_);
        item->setFlags(item->flags() | Qt::ItemIsUserCheckable);
        item->setCheckState(e.enabled ? Qt::Checked : Qt::Unchecked);
        const std::string why = problem(e);
        QString tip = QString::fromStdString(e.method);
        if (const auto* info = solve::findMethod(e.method)) tip += ": " + QString::fromStdString(info->summary);
        if (!why.empty()) {
            tip += "\n" + tr("Not run: %1").arg(QString::fromStdString(why));
            item->setForeground(widgets::problemTextColour(palette()));
        }
        item->setToolTip(tip);
    }
    if (current >= 0 && current < list_->count()) list_->setCurrentRow(current);
    updating_ = wasUpdating;
}

void LineupEditor::refreshDetails() {
    const bool wasUpdating = updating_;
    updating_ = true;
    const int i = currentEntry();
    const bool has = i >= 0 && i < static_cast<int>(entries_.size());
    details_->setEnabled(has);
    duplicate_->setEnabled(has);
    remove_->setEnabled(has);
    up_->setEnabled(has && i > 0);
    down_->setEnabled(has && i + 1 < static_cast<int>(entries_.size()));
    options_->setRowCount(0);
    if (!has) {
        label_->clear();
        method_->clear();
        message_->clear();
        updating_ = wasUpdating;
        return;
    }
    const study::MethodEntry& e = entries_[static_cast<std::size_t>(i)];
    label_->setText(QString::fromStdString(e.label));
    const solve::MethodInfo* info = solve::findMethod(e.method);
    method_->setText(info ? QStringLiteral("%1 (%2) — %3")
                                .arg(methodDisplayName(e.method), QString::fromStdString(e.method),
                                     QString::fromStdString(info->summary))
                          : QString::fromStdString(e.method));
    const QColor colour(QString::fromStdString(e.colour));
    colour_->setText(colour.name());
    QPixmap swatch(14, 14);
    swatch.fill(colour);
    colour_->setIcon(QIcon(swatch));
    marker_->setCurrentIndex(std::max(0, marker_->findText(QString::fromStdString(e.marker))));
    if (info) {
        for (const auto& spec : info->options) {
            const int row = options_->rowCount();
            options_->insertRow(row);
            auto* name = new QTableWidgetItem(QString::fromStdString(spec.name));
            name->setFlags(name->flags() & ~Qt::ItemIsEditable);
            name->setToolTip(QString::fromStdString(spec.description));
            auto it = e.options.find(spec.name);
            auto* value = new QTableWidgetItem(it == e.options.end() ? QString() : QString::fromStdString(it->second));
            value->setData(Qt::UserRole, QString::fromStdString(spec.name));
            value->setToolTip(tr("Leave empty for the default, %1").arg(QString::fromStdString(spec.defaultText())));
            // Empty value = default, so the default leads the "Allowed" cell.
            auto* allowed = new QTableWidgetItem(tr("default %1; %2")
                                                     .arg(QString::fromStdString(spec.defaultText()),
                                                          QString::fromStdString(spec.rangeText())));
            allowed->setFlags(allowed->flags() & ~Qt::ItemIsEditable);
            allowed->setToolTip(tr("Default %1; %2")
                                    .arg(QString::fromStdString(spec.defaultText()),
                                         QString::fromStdString(spec.description)));
            options_->setItem(row, OptionName, name);
            options_->setItem(row, OptionValue, value);
            options_->setItem(row, OptionAllowed, allowed);
            if (it == e.options.end()) value->setData(Qt::DisplayRole, QString());
            value->setText(it == e.options.end() ? QString() : QString::fromStdString(it->second));
        }
    }
    const std::string why = problem(e);
    message_->setText(QString::fromStdString(why));
    message_->setVisible(!why.empty());
    updating_ = wasUpdating;
}

void LineupEditor::onItemChanged() {
    if (updating_) return;
    bool changed = false;
    for (int row = 0; row < list_->count() && row < static_cast<int>(entries_.size()); ++row) {
        const bool on = list_->item(row)->checkState() == Qt::Checked;
        if (entries_[static_cast<std::size_t>(row)].enabled != on) {
            entries_[static_cast<std::size_t>(row)].enabled = on;
            changed = true;
        }
    }
    if (changed) emit edited();
}

void LineupEditor::onDetailsEdited() {
    if (updating_) return;
    const int i = currentEntry();
    if (i < 0 || i >= static_cast<int>(entries_.size())) return;
    study::MethodEntry& e = entries_[static_cast<std::size_t>(i)];
    const study::MethodEntry before = e;
    QString label = label_->text().trimmed();
    if (label.isEmpty()) label = QString::fromStdString(e.method);
    if (label.toStdString() != e.label) {
        e.label.clear();  // so the entry's own old name does not count as taken
        e.label = uniqueLabel(label).toStdString();
    }
    e.marker = marker_->currentText().toStdString();
    e.options.clear();
    for (int row = 0; row < options_->rowCount(); ++row) {
        const QTableWidgetItem* value = options_->item(row, OptionValue);
        if (!value) continue;
        const QString text = value->text().trimmed();
        if (!text.isEmpty()) e.options[value->data(Qt::UserRole).toString().toStdString()] = text.toStdString();
    }
    const bool changed = before.label != e.label || before.marker != e.marker || before.options != e.options;
    if (!changed) return;
    refreshList();
    // The option table is rebuilt once the cell editor that caused this edit has closed: rebuilt
    // now, its rows would be gone under the closing editor ("closeEditor called with an editor
    // that does not belong to this view").
    QMetaObject::invokeMethod(this, [this] { refreshDetails(); }, Qt::QueuedConnection);
    emit edited();
}

void LineupEditor::chooseColour() {
    const int i = currentEntry();
    if (i < 0) return;
    auto& e = entries_[static_cast<std::size_t>(i)];
    const QColor chosen = QColorDialog::getColor(QColor(QString::fromStdString(e.colour)), this, tr("Entry colour"));
    if (!chosen.isValid()) return;
    e.colour = chosen.name().toStdString();
    refreshList();
    refreshDetails();
    emit edited();
}

void LineupEditor::changeEvent(QEvent* event) {
    if (event->type() == QEvent::PaletteChange || event->type() == QEvent::ApplicationPaletteChange) {
        message_->setStyleSheet(widgets::problemTextStyle(palette()));
        refreshList();  // entries with a problem are drawn in the problem colour
    }
    QWidget::changeEvent(event);
}

}  // namespace sw::window
