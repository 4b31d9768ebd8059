#pragma once
// Preferences: what a user sets once, kept in QSettings (group "preferences") and applied
// to the open window as soon as they change. The landscape settings (colour scale, contour
// lines, grid) and the iteration limit are what a new study starts with; a study file keeps
// its own copy, which the dialog also updates when the user changes them there.

#include <QDialog>
#include <QString>

class QCheckBox;
class QComboBox;
class QSettings;
class QSpinBox;

namespace sw::window {

enum class PaletteChoice { System, Light, Dark };

struct Preferences {
    int animationSpeed = 5;  // iterations per second while animating, 1..60
    bool logColour = false;  // landscape colour by log10(f - lowest f on the plane) instead of f
    int contourLevels = 14;  // contour lines on the landscape, 2..100
    int gridCells = 200;     // landscape resolution, cells per side, 20..2000
    int maxIterations = 200; // iteration limit of a new study, 1..1000000
    int exportWidth = 1200;  // default size of an exported view (pixels; points for SVG/PDF), 100..8000
    int exportHeight = 900;
    QString exportFormat = QStringLiteral("png");  // "png", "svg" or "pdf"
    PaletteChoice palette = PaletteChoice::System;

    // False with a sentence naming the setting and its valid range.
    bool isValid(QString* why = nullptr) const;
    bool operator==(const Preferences&) const = default;

    // Reads group "preferences"; a missing or out-of-range value falls back to its default.
    static Preferences load(QSettings& settings);
    void save(QSettings& settings) const;
};

QString paletteName(PaletteChoice choice);  // "system", "light", "dark"
PaletteChoice paletteFromName(const QString& name, bool* ok = nullptr);

// Sets the application's palette: our own dark or light colours (on the Fusion style, which
// follows the palette everywhere), or the style and palette the program started with.
void applyPalette(PaletteChoice choice);

// The dialog edits a copy and reports every change at once (preferencesChanged), so the
// window applies it live; Cancel hands back the values it opened with.
class PreferencesDialog : public QDialog {
    Q_OBJECT
public:
    explicit PreferencesDialog(const Preferences& current, QWidget* parent = nullptr);
    Preferences preferences() const { return edited_; }
    Preferences original() const { return original_; }

    QSpinBox* animationSpeedBox() const { return speed_; }
    QCheckBox* logColourBox() const { return logColour_; }
    QSpinBox* contourLevelsBox() const { return levels_; }
    QSpinBox* gridCellsBox() const { return grid_; }
    QSpinBox* maxIterationsBox() const { return iterations_; }
    QSpinBox* exportWidthBox() const { return width_; }
    QSpinBox* exportHeightBox() const { return height_; }
    QComboBox* exportFormatBox() const { return format_; }
    QComboBox* paletteBox() const { return palette_; }

public slots:
    void restoreDefaults();
    void reject() override;

signals:
    void preferencesChanged(const sw::window::Preferences& preferences);

private:
    void showValues(const Preferences& p);
    void readControls();

    Preferences original_, edited_;
    bool showing_ = false;
    QSpinBox* speed_ = nullptr;
    QCheckBox* logColour_ = nullptr;
    QSpinBox* levels_ = nullptr;
    QSpinBox* grid_ = nullptr;
    QSpinBox* iterations_ = nullptr;
    QSpinBox* width_ = nullptr;
    QSpinBox* height_ = nullptr;
    QComboBox* format_ = nullptr;
    QComboBox* palette_ = nullptr;
};

}  // namespace sw::window
