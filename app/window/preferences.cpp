#include "app/window/preferences.h"

#include <QApplication>
#include <QCheckBox>
#include <QComboBox>
#include <QDialogButtonBox>
#include <QFormLayout>
#include <QLabel>
#include <QPalette>
#include <QPointer>
#include <QPushButton>
#include <QSettings>
#include <QSpinBox>
#include <QStyle>
#include <QStyleFactory>
#include <QVBoxLayout>

namespace sw::window {

namespace {

struct Range {
    const char* key;
    int lowest, highest;
};
constexpr Range kSpeed{"animation-speed", 1, 60};
constexpr Range kLevels{"contour-levels", 2, 100};
constexpr Range kGrid{"grid-cells", 20, 2000};
constexpr Range kIterations{"max-iterations", 1, 1000000};
constexpr Range kWidth{"export-width", 100, 8000};
constexpr Range kHeight{"export-height", 100, 8000};

bool inRange(int value, const Range& range) { return value >= range.lowest && value <= range.highest; }

bool knownFormat(const QString& format) {
    return format == QLatin1String("png") || format == QLatin1String("svg") || format == QLatin1String("pdf");
}

int readInt(QSettings& settings, const Range& range, int fallback) {
    bool ok = false;
    const int value = settings.value(range.key, fallback).toInt(&ok);
    return ok && inRange(value, range) ? value : fallback;
}

// Our own dark scheme: warm grey surfaces, near-white text, a clear blue for selection and
// links; disabled text dimmed but still above 3:1 against the window.
QPalette darkPalette() {
    QPalette p;
    const QColor window(0x2a, 0x2c, 0x30), base(0x1e, 0x20, 0x23), text(0xe8, 0xe6, 0xe3);
    const QColor button(0x34, 0x37, 0x3c), highlight(0x3d, 0x7e, 0xd0), dim(0x8e, 0x8c, 0x88);
    p.setColor(QPalette::Window, window);
    p.setColor(QPalette::WindowText, text);
    p.setColor(QPalette::Base, base);
    p.setColor(QPalette::AlternateBase, QColor(0x26, 0x28, 0x2c));
    p.setColor(QPalette::ToolTipBase, QColor(0x3a, 0x3d, 0x42));
    p.setColor(QPalette::ToolTipText, text);
    p.setColor(QPalette::PlaceholderText, dim);
    p.setColor(QPalette::Text, text);
    p.setColor(QPalette::Button, button);
    p.setColor(QPalette::ButtonText, text);
    p.setColor(QPalette::BrightText, QColor(0xff, 0x8a, 0x80));
    p.setColor(QPalette::Light, QColor(0x4a, 0x4d, 0x53));
    p.setColor(QPalette::Midlight, QColor(0x3e, 0x41, 0x46));
    p.setColor(QPalette::Mid, QColor(0x24, 0x26, 0x29));
    p.setColor(QPalette::Dark, QColor(0x18, 0x19, 0x1b));
    p.setColor(QPalette::Shadow, QColor(0x0c, 0x0c, 0x0d));
    p.setColor(QPalette::Highlight, highlight);
    p.setColor(QPalette::HighlightedText, QColor(0xff, 0xff, 0xff));
    p.setColor(QPalette::Link, QColor(0x7c, 0xb4, 0xf5));
    p.setColor(QPalette::LinkVisited, QColor(0xb8, 0x9c, 0xf0));
    for (QPalette::ColorRole role : {QPalette::WindowText, QPalette::Text, QPalette::ButtonText})
        p.setColor(QPalette::Disabled, role, dim);
    p.setColor(QPalette::Disabled, QPalette::Highlight, QColor(0x4a, 0x4d, 0x53));
    return p;
}

struct StartupLook {
    QString styleName;
    QPalette palette;
};

StartupLook& startupLook() {
    static StartupLook look = [] {
        StartupLook l;
        l.styleName = QApplication::style() ? QApplication::style()->name() : QString();
        l.palette = QApplication::palette();
        return l;
    }();
    return look;
}

}  // namespace

bool Preferences::isValid(QString* why) const {
    auto fail = [why](const QString& sentence) {
        if (why) *why = sentence;
        return false;
    };
    auto check = [&](int value, const Range& range) {
        return inRange(value, range) ? true
                                     : fail(QStringLiteral("%1: %2 is out of range; it must be %3..%4")
                                                .arg(QLatin1String(range.key))
                                                .arg(value)
                                                .arg(range.lowest)
                                                .arg(range.highest));
    };
    if (!check(animationSpeed, kSpeed) || !check(contourLevels, kLevels) || !check(gridCells, kGrid) ||
        !check(maxIterations, kIterations) || !check(exportWidth, kWidth) || !check(exportHeight, kHeight))
        return false;
    if (!knownFormat(exportFormat))
        return fail(QStringLiteral("export-format: '%1' is not known; use png, svg or pdf").arg(exportFormat));
    if (why) why->clear();
    return true;
}

Preferences Preferences::load(QSettings& settings) {
    const Preferences defaults;
    Preferences p;
    settings.beginGroup(QStringLiteral("preferences"));
    p.animationSpeed = readInt(settings, kSpeed, defaults.animationSpeed);
    p.logColour = settings.value("log-colour", defaults.logColour).toBool();
    p.contourLevels = readInt(settings, kLevels, defaults.contourLevels);
    p.gridCells = readInt(settings, kGrid, defaults.gridCells);
    p.maxIterations = readInt(settings, kIterations, defaults.maxIterations);
    p.exportWidth = readInt(settings, kWidth, defaults.exportWidth);
    p.exportHeight = readInt(settings, kHeight, defaults.exportHeight);
    p.exportFormat = settings.value("export-format", defaults.exportFormat).toString();
    if (!knownFormat(p.exportFormat)) p.exportFormat = defaults.exportFormat;
    bool ok = false;
    p.palette = paletteFromName(settings.value("palette", paletteName(defaults.palette)).toString(), &ok);
    if (!ok) p.palette = defaults.palette;
    settings.endGroup();
    return p;
}

void Preferences::save(QSettings& settings) const {
    settings.beginGroup(QStringLiteral("preferences"));
    settings.setValue(kSpeed.key, animationSpeed);
    settings.setValue("log-colour", logColour);
    settings.setValue(kLevels.key, contourLevels);
    settings.setValue(kGrid.key, gridCells);
    settings.setValue(kIterations.key, maxIterations);
    settings.setValue(kWidth.key, exportWidth);
    settings.setValue(kHeight.key, exportHeight);
    settings.setValue("export-format", exportFormat);
    settings.setValue("palette", paletteName(palette));
    settings.endGroup();
}

QString paletteName(PaletteChoice choice) {
    switch (choice) {
    case PaletteChoice::System: return QStringLiteral("system");
    case PaletteChoice::Light: return QStringLiteral("light");
    case PaletteChoice::Dark: return QStringLiteral("dark");
    }
    return QStringLiteral("system");
}

PaletteChoice paletteFromName(const QString& name, bool* ok) {
    for (PaletteChoice c : {PaletteChoice::System, PaletteChoice::Light, PaletteChoice::Dark}) {
        if (paletteName(c) == name) {
            if (ok) *ok = true;
            return c;
        }
    }
    if (ok) *ok = false;
    return PaletteChoice::System;
}

void applyPalette(PaletteChoice choice) {
    const StartupLook& look = startupLook();  // remembered before the first change
    const QString wanted = choice == PaletteChoice::System ? look.styleName : QStringLiteral("Fusion");
    if (!wanted.isEmpty() && QApplication::style() && QApplication::style()->name().compare(wanted, Qt::CaseInsensitive) != 0)
        if (QStyle* style = QStyleFactory::create(wanted)) QApplication::setStyle(style);
    switch (choice) {
    case PaletteChoice::System: QApplication::setPalette(look.palette); break;
    case PaletteChoice::Light: QApplication::setPalette(QApplication::style()->standardPalette()); break;
    case PaletteChoice::Dark: QApplication::setPalette(darkPalette()); break;
    }
}

PreferencesDialog::PreferencesDialog(const Preferences& current, QWidget* parent)
    : QDialog(parent), original_(current), edited_(current) {
    setObjectName(QStringLiteral("preferencesDialog"));
    setWindowTitle(tr("Preferences"));
    auto spin = [this](const Range& range, const QString& suffix, const QString& tip) {
        auto* box = new QSpinBox(this);
        box->setRange(range.lowest, range.highest);
        box->setSuffix(suffix);
        box->setToolTip(tip);
        box->setAccelerated(true);
        connect(box, &QSpinBox::valueChanged, this, &PreferencesDialog::readControls);
        return box;
    };
    speed_ = spin(kSpeed, tr(" steps/s"), tr("How many iterations per second Play shows"));
    logColour_ = new QCheckBox(tr("Colour by log10(f − lowest f on the plane)"), this);
    logColour_->setToolTip(tr("A log colour scale shows both a deep valley floor and its steep walls"));
    connect(logColour_, &QCheckBox::toggled, this, &PreferencesDialog::readControls);
    levels_ = spin(kLevels, QString(), tr("How many contour lines the landscape draws"));
    grid_ = spin(kGrid, tr(" cells"), tr("Cells per side of the sampled landscape: finer is smoother but slower"));
    grid_->setSingleStep(50);
    iterations_ = spin(kIterations, QString(), tr("The iteration limit every method gets in a new study"));
    iterations_->setSingleStep(50);
    width_ = spin(kWidth, tr(" px"), tr("Width of an exported view (PNG in pixels, SVG and PDF in points)"));
    height_ = spin(kHeight, tr(" px"), tr("Height of an exported view (PNG in pixels, SVG and PDF in points)"));
    format_ = new QComboBox(this);
    format_->addItem(tr("PNG picture"), QStringLiteral("png"));
    format_->addItem(tr("SVG drawing"), QStringLiteral("svg"));
    format_->addItem(tr("PDF document"), QStringLiteral("pdf"));
    format_->setToolTip(tr("The format Export view suggests first"));
    connect(format_, &QComboBox::currentIndexChanged, this, &PreferencesDialog::readControls);
    palette_ = new QComboBox(this);
    palette_->addItem(tr("As the system"), paletteName(PaletteChoice::System));
    palette_->addItem(tr("Light"), paletteName(PaletteChoice::Light));
    palette_->addItem(tr("Dark"), paletteName(PaletteChoice::Dark));
    palette_->setToolTip(tr("Colours of the window and the plots"));
    connect(palette_, &QComboBox::currentIndexChanged, this, &PreferencesDialog::readControls);

    auto* form = new QFormLayout;
    auto note = [this](const QString& text) {
        auto* label = new QLabel(text, this);
        label->setWordWrap(true);
        QFont small = label->font();
        small.setPointSizeF(small.pointSizeF() * 0.9);
        label->setFont(small);
        return label;
    };
    form->addRow(tr("Animation speed"), speed_);
    form->addRow(tr("Appearance"), palette_);
    form->addRow(note(tr("<b>Landscape</b> — new studies start with these; changing one here also changes the "
                         "open study.")));
    form->addRow(tr("Colour scale"), logColour_);
    form->addRow(tr("Contour lines"), levels_);
    form->addRow(tr("Grid resolution"), grid_);
    form->addRow(note(tr("<b>Runs</b>")));
    form->addRow(tr("Iteration limit"), iterations_);
    form->addRow(note(tr("<b>Export view</b>")));
    form->addRow(tr("Width"), width_);
    form->addRow(tr("Height"), height_);
    form->addRow(tr("Format"), format_);
    for (QWidget* field : {static_cast<QWidget*>(speed_), static_cast<QWidget*>(palette_),
                           static_cast<QWidget*>(logColour_), static_cast<QWidget*>(levels_),
                           static_cast<QWidget*>(grid_), static_cast<QWidget*>(iterations_),
                           static_cast<QWidget*>(width_), static_cast<QWidget*>(height_),
                           static_cast<QWidget*>(format_)})
        if (auto* label = qobject_cast<QLabel*>(form->labelForField(field))) label->setToolTip(field->toolTip());

    auto* buttons = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel |
                                             QDialogButtonBox::RestoreDefaults,
                                         this);
    buttons->button(QDialogButtonBox::Ok)->setToolTip(tr("Keep these settings"));
    buttons->button(QDialogButtonBox::Cancel)->setToolTip(tr("Go back to the settings as they were"));
    buttons->button(QDialogButtonBox::RestoreDefaults)->setToolTip(tr("Put every setting back to its default"));
    connect(buttons, &QDialogButtonBox::accepted, this, &QDialog::accept);
    connect(buttons, &QDialogButtonBox::rejected, this, &PreferencesDialog::reject);
    connect(buttons->button(QDialogButtonBox::RestoreDefaults), &QPushButton::clicked, this,
            &PreferencesDialog::restoreDefaults);
    auto* layout = new QVBoxLayout(this);
    layout->addLayout(form);
    layout->addWidget(buttons);
    showValues(current);
}

void PreferencesDialog::showValues(const Preferences& p) {
    showing_ = true;
    speed_->setValue(p.animationSpeed);
    logColour_->setChecked(p.logColour);
    levels_->setValue(p.contourLevels);
    grid_->setValue(p.gridCells);
    iterations_->setValue(p.maxIterations);
    width_->setValue(p.exportWidth);
    height_->setValue(p.exportHeight);
    format_->setCurrentIndex(std::max(0, format_->findData(p.exportFormat)));
    palette_->setCurrentIndex(std::max(0, palette_->findData(paletteName(p.palette))));
    showing_ = false;
    readControls();
}

void PreferencesDialog::readControls() {
    if (showing_) return;
    Preferences p;
    p.animationSpeed = speed_->value();
    p.logColour = logColour_->isChecked();
    p.contourLevels = levels_->value();
    p.gridCells = grid_->value();
    p.maxIterations = iterations_->value();
    p.exportWidth = width_->value();
    p.exportHeight = height_->value();
    p.exportFormat = format_->currentData().toString();
    p.palette = paletteFromName(palette_->currentData().toString());
    if (p == edited_) return;
    edited_ = p;
    emit preferencesChanged(edited_);
}

void PreferencesDialog::restoreDefaults() { showValues(Preferences{}); }

void PreferencesDialog::reject() {
    showValues(original_);
    QDialog::reject();
}

}  // namespace sw::window
