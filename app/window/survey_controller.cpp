// (Include order: core headers first, then Qt.)
#include "app/window/survey_controller.h"

#include "core/report/study_run.h"
#include "core/solve/solver.h"
#include "widgets/basins_view.h"
#include "widgets/critical_overlay.h"
#include "widgets/critical_points_table.h"
#include "widgets/landscape_view.h"
#include "widgets/plot_style.h"

#include <QCheckBox>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QLabel>
#include <QListWidget>
#include <QPushButton>
#include <QSpinBox>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

namespace sw::window {

namespace {

QString regionKey(const survey::Region& r) {
    QStringList parts;
    for (Eigen::Index i = 0; i < r.lower.size(); ++i)
        parts << QString::number(r.lower[i], 'g', 17) << QString::number(r.upper[i], 'g', 17);
    for (Eigen::Index i = 0; i < r.held.size(); ++i) parts << QString::number(r.held[i], 'g', 17);
    parts << QString::number(r.xVariable) << QString::number(r.yVariable);
    return parts.join(QLatin1Char(','));
}

}  // namespace

SurveyController::SurveyController(JobRunner* jobs, widgets::LandscapeView* landscape, QWidget* parent)
    : QObject(parent), jobs_(jobs), landscape_(landscape) {
    criticalPanel_ = buildCriticalPanel(parent);
    basinsPanel_ = buildBasinsPanel(parent);
    overlay_ = new widgets::CriticalOverlay(landscape_->plot(), this);

    connect(jobs_, &JobRunner::criticalReady, this, &SurveyController::showCritical);
    connect(jobs_, &JobRunner::basinsReady, this, &SurveyController::showBasins);
    connect(jobs_, &JobRunner::surveyFailed, this, [this](int kind, const QString& problem) {
        if (kind == JobRunner::Critical) {
            criticalProblem_ = problem;
            updateCriticalSummary();
        } else {
            basinsProblem_ = problem;
            basinsSummary_->setText(problem);
            basinsView_->setSurvey(nullptr);
            basinsView_->setMessage(problem);
        }
    });
    // A cancelled survey leaves the last results on show and may be asked for again.
    connect(jobs_, &JobRunner::jobEnded, this, [this](int kind, bool cancelled) {
        if (!cancelled) return;
        if (kind == JobRunner::Basins && !jobs_->busy(JobRunner::Basins)) {
            basinInputs_.clear();
            basinsSummary_->setText(basins_ ? tr("Cancelled; the maps shown are the previous ones.") : tr("Cancelled."));
        }
        if (kind == JobRunner::Critical && !jobs_->busy(JobRunner::Critical)) {
            criticalInputs_.clear();
            if (!map_) criticalSummary_->setText(tr("Cancelled."));
        }
    });
    connect(overlay_, &widgets::CriticalOverlay::pointClicked, this, [this](int point) { table_->selectPoint(point); overlay_->setHighlighted(point); runFromHere_->setEnabled(true); });
    connect(overlay_, &widgets::CriticalOverlay::pointActivated, this, &SurveyController::runFromPoint);
    connect(table_, &widgets::CriticalPointsTable::pointSelected, this, [this](int point) {
        overlay_->setHighlighted(point);
        runFromHere_->setEnabled(point >= 0);
    });
    connect(table_, &widgets::CriticalPointsTable::pointActivated, this, &SurveyController::runFromPoint);
    connect(basinsView_, &widgets::BasinsView::cellClicked, this, [this](const Vector& start) { emit startRequested(start); });
    basinDelay_.setSingleShot(true);
    basinDelay_.setInterval(250);
    connect(&basinDelay_, &QTimer::timeout, this, &SurveyController::requestBasins);
}

QWidget* SurveyController::buildCriticalPanel(QWidget* parent) {
    auto* panel = new QWidget(parent);
    panel->setObjectName(QStringLiteral("criticalPanel"));
    auto* layout = new QVBoxLayout(panel);
    layout->setContentsMargins(4, 4, 4, 4);
    auto* row = new QHBoxLayout;
    criticalOn_ = new QCheckBox(tr("Show critical points"), panel);
    criticalOn_->setToolTip(tr("Find every point in the plotted box where the gradient vanishes, mark them on the "
                               "landscape and keep them up to date (saved with the study)"));
    starts_ = new QSpinBox(panel);
    starts_->setRange(1, 1000000);
    starts_->setValue(256);
    starts_->setPrefix(tr("starts "));
    starts_->setToolTip(tr("Halton starts in the box; more starts find points with small basins"));
    signChangeGrid_ = new QSpinBox(panel);
    signChangeGrid_->setRange(0, 1000);
    signChangeGrid_->setValue(64);
    signChangeGrid_->setPrefix(tr("sign-change grid "));
    signChangeGrid_->setToolTip(tr("Cells per side of the plane's grid whose cells where both gradient components "
                                   "change sign are added as starts (0: none)"));
    runFromHere_ = new QPushButton(tr("Run from here"), panel);
    runFromHere_->setToolTip(tr("Run the methods from near the selected point, along its lowest-curvature direction "
                                "(a saddle's escape direction); double-clicking a point does the same"));
    runFromHere_->setEnabled(false);
    row->addWidget(criticalOn_);
    row->addWidget(starts_);
    row->addWidget(signChangeGrid_);
    row->addStretch(1);
    row->addWidget(runFromHere_);
    layout->addLayout(row);
    criticalSummary_ = new QLabel(panel);
    criticalSummary_->setObjectName(QStringLiteral("criticalSummary"));
    criticalSummary_->setWordWrap(true);
    criticalSummary_->setText(tr("Switch on to find the minima, saddles and maxima in the plotted box."));
    layout->addWidget(criticalSummary_);
    table_ = new widgets::CriticalPointsTable(panel);
    layout->addWidget(table_, 1);

    connect(criticalOn_, &QCheckBox::toggled, this, [this](bool on) {
        if (!on) {
            jobs_->cancel(JobRunner::Critical);
            map_.reset();
            criticalInputs_.clear();
            overlay_->setMap(nullptr, 0, 1);
            table_->setMap(nullptr);
            updateCriticalSummary();
        }
        controlsEdited();
        if (on) requestCritical();
    });
    for (QSpinBox* box : {starts_, signChangeGrid_})
        connect(box, &QSpinBox::valueChanged, this, [this] {
            controlsEdited();
            requestCritical();
        });
    connect(runFromHere_, &QPushButton::clicked, this, [this] { runFromPoint(table_->selectedPoint()); });
    return panel;
}

QWidget* SurveyController::buildBasinsPanel(QWidget* parent) {
    auto* panel = new QWidget(parent);
    panel->setObjectName(QStringLiteral("basinsPanel"));
    // Controls in one strip above the maps, so the maps get the panel's whole width.
    auto* layout = new QVBoxLayout(panel);
    layout->setContentsMargins(4, 4, 4, 4);
    auto* strip = new QHBoxLayout;
    basinsOn_ = new QCheckBox(tr("Show basin maps"), panel);
    basinsOn_->setToolTip(tr("Run each chosen method from every cell of a grid over the plotted plane and colour the "
                             "cell by the critical point the run ends at (saved with the study)"));
    grid_ = new QSpinBox(panel);
    grid_->setRange(1, survey::BasinSettings::kMaxGrid);  // what a study file may hold, so nothing is clamped
    grid_->setValue(200);
    grid_->setPrefix(tr("grid "));
    grid_->setSuffix(tr(" cells"));
    grid_->setToolTip(tr("Cells per side: grid x grid runs per method"));
    methods_ = new QListWidget(panel);
    methods_->setObjectName(QStringLiteral("basinMethods"));
    methods_->setToolTip(tr("The lineup entries to map, side by side"));
    methods_->setFlow(QListView::LeftToRight);
    methods_->setWrapping(true);
    methods_->setResizeMode(QListView::Adjust);
    methods_->setSpacing(1);
    methods_->setMaximumHeight(2 * methods_->fontMetrics().height() + 14);
    basinsSummary_ = new QLabel(panel);
    basinsSummary_->setObjectName(QStringLiteral("basinsSummary"));
    basinsSummary_->setWordWrap(true);
    auto* left = new QVBoxLayout;
    left->addWidget(basinsOn_);
    left->addWidget(grid_);
    strip->addLayout(left);
    strip->addWidget(methods_, 1);
    layout->addLayout(strip);
    layout->addWidget(basinsSummary_);
    basinsView_ = new widgets::BasinsView(panel);
    layout->addWidget(basinsView_, 1);

    connect(basinsOn_, &QCheckBox::toggled, this, [this](bool on) {
        if (!on) {
            jobs_->cancel(JobRunner::Basins);
            basins_.reset();
            basinInputs_.clear();
            basinsView_->setSurvey(nullptr);
            basinsSummary_->clear();
        }
        controlsEdited();
        if (on) requestBasins();
    });
    connect(grid_, &QSpinBox::valueChanged, this, [this] {
        controlsEdited();
        basinDelay_.start();
    });
    connect(methods_, &QListWidget::itemChanged, this, [this] {
        if (loading_) return;
        controlsEdited();
        basinDelay_.start();
    });
    return panel;
}

study::SurveySettings SurveyController::settingsFromControls() const {
    study::SurveySettings s;
    s.critical = criticalOn_->isChecked();
    s.criticalStarts = starts_->value();
    s.signChangeGrid = signChangeGrid_->value();
    s.basins = basinsOn_->isChecked();
    s.basinGrid = grid_->value();
    for (int i = 0; i < methods_->count(); ++i)
        if (methods_->item(i)->checkState() == Qt::Checked) s.basinMethods.push_back(methods_->item(i)->text().toStdString());
    return s;
}

void SurveyController::controlsEdited() {
    if (loading_) return;
    const study::SurveySettings s = settingsFromControls();
    const std::optional<study::SurveySettings> wanted =
        s.critical || s.basins ? std::optional<study::SurveySettings>(s) : std::nullopt;
    if (wanted == study_.surveys) return;
    study_.surveys = wanted;
    emit surveysEdited(s);
}

void SurveyController::fillMethodList(const std::vector<std::string>* keep) {
    const bool wasLoading = loading_;
    loading_ = true;
    std::vector<std::string> checked;
    if (keep) {
        checked = *keep;
    } else if (study_.surveys && !study_.surveys->basinMethods.empty()) {
        checked = study_.surveys->basinMethods;
    } else {
        for (const study::MethodEntry& m : study_.methods)
            if (m.enabled && checked.size() < 3) checked.push_back(m.label);
    }
    methods_->clear();
    for (const study::MethodEntry& m : study_.methods) {
        auto* item = new QListWidgetItem(QString::fromStdString(m.label), methods_);
        item->setFlags(Qt::ItemIsEnabled | Qt::ItemIsUserCheckable | Qt::ItemIsSelectable);
        item->setCheckState(std::find(checked.begin(), checked.end(), m.label) != checked.end() ? Qt::Checked
                                                                                                 : Qt::Unchecked);
        item->setToolTip(QString::fromStdString(m.method));
    }
    loading_ = wasLoading;
}

void SurveyController::studyOpened(const study::Study& study) {
    loading_ = true;
    study_ = study;
    const study::SurveySettings s = study.surveys.value_or(study::SurveySettings{});
    criticalOn_->setChecked(s.critical);
    starts_->setValue(s.criticalStarts);
    signChangeGrid_->setValue(s.signChangeGrid);
    basinsOn_->setChecked(s.basins);
    grid_->setValue(s.basinGrid);
    fillMethodList(nullptr);
    map_.reset();
    basins_.reset();
    criticalInputs_.clear();
    basinInputs_.clear();
    overlay_->setMap(nullptr, 0, 1);
    table_->setMap(nullptr);
    basinsView_->setSurvey(nullptr);
    basinsSummary_->clear();
    loading_ = false;
    updateCriticalSummary();
}

void SurveyController::studyChanged(const study::Study& study, std::shared_ptr<const Objective> objective) {
    const bool labelsChanged =
        study.methods.size() != study_.methods.size() ||
        !std::equal(study.methods.begin(), study.methods.end(), study_.methods.begin(),
                    [](const study::MethodEntry& a, const study::MethodEntry& b) { return a.label == b.label; });
    const std::optional<study::SurveySettings> surveys = study_.surveys;  // the controls own these
    const std::vector<std::string> ticked = settingsFromControls().basinMethods;
    study_ = study;
    study_.surveys = surveys;
    if (labelsChanged) {
        fillMethodList(&ticked);  // labels still in the lineup stay ticked
        controlsEdited();
    }
    if (objective != objective_) {
        objective_ = std::move(objective);
        criticalInputs_.clear();
        basinInputs_.clear();
    }
    if (map_) overlay_->setMap(map_, study_.view.plotX, study_.view.plotY);
    requestCritical();
    requestBasins();
}

survey::Region SurveyController::region() const { return report::surveyRegion(study_); }

void SurveyController::requestCritical() {
    if (!criticalOn_->isChecked() || !objective_) return;
    CriticalRequest request;
    request.objective = objective_;
    request.region = region();
    request.settings.starts = starts_->value();
    request.settings.signChangeGrid = signChangeGrid_->value();
    const QString inputs = regionKey(request.region) + QStringLiteral("|%1|%2").arg(starts_->value()).arg(signChangeGrid_->value());
    if (inputs == criticalInputs_ && (map_ || jobs_->busy(JobRunner::Critical))) return;
    criticalInputs_ = inputs;
    criticalProblem_.clear();
    criticalSummary_->setText(tr("Searching…"));
    jobs_->findCritical(request);
}

void SurveyController::requestBasins() {
    if (!basinsOn_->isChecked() || !objective_) return;
    BasinRequest request;
    request.objective = objective_;
    request.region = region();
    request.critical.starts = starts_->value();
    request.critical.signChangeGrid = signChangeGrid_->value();
    request.settings.grid = grid_->value();
    request.settings.rules = study_.stoppingRules();
    QString inputs = regionKey(request.region) + QStringLiteral("|%1|%2|%3").arg(starts_->value()).arg(signChangeGrid_->value()).arg(grid_->value());
    for (int i = 0; i < methods_->count(); ++i) {
        if (methods_->item(i)->checkState() != Qt::Checked) continue;
        const std::string label = methods_->item(i)->text().toStdString();
        for (const study::MethodEntry& m : study_.methods)
            if (m.label == label) {
                request.methods.push_back({m.label, m.method, m.options});
                inputs += QStringLiteral("|") + QString::fromStdString(m.label + "=" + m.method);
                for (const auto& [name, value] : m.options) inputs += QString::fromStdString("," + name + "=" + value);
            }
    }
    inputs += QStringLiteral("|%1|%2").arg(request.settings.rules.maxIterations).arg(request.settings.rules.gradientTolerance, 0, 'g', 17);
    if (request.methods.empty()) {
        jobs_->cancel(JobRunner::Basins);
        basins_.reset();
        basinInputs_.clear();
        basinsView_->setSurvey(nullptr);
        basinsView_->setMessage(tr("Tick one or more methods to map their basins"));
        basinsSummary_->clear();
        return;
    }
    if (inputs == basinInputs_ && (basins_ || jobs_->busy(JobRunner::Basins))) return;
    basinInputs_ = inputs;
    basinsProblem_.clear();
    basinsSummary_->setText(tr("Mapping %1 × %1 cells for %n method(s)…", nullptr, static_cast<int>(request.methods.size()))
                                .arg(request.settings.grid));
    jobs_->mapBasins(request);
}

void SurveyController::showCritical(std::shared_ptr<const survey::CriticalMap> map,
                                    std::shared_ptr<const Objective> objective) {
    if (objective != objective_ || !criticalOn_->isChecked()) return;
    map_ = std::move(map);
    overlay_->setMap(map_, study_.view.plotX, study_.view.plotY);
    table_->setMap(map_);
    runFromHere_->setEnabled(false);
    updateCriticalSummary();
    emit criticalShown();
}

void SurveyController::updateCriticalSummary() {
    if (!criticalProblem_.isEmpty()) {
        criticalSummary_->setText(criticalProblem_);
        return;
    }
    if (!map_) {
        if (!criticalOn_->isChecked())
            criticalSummary_->setText(tr("Switch on to find the minima, saddles and maxima in the plotted box."));
        return;
    }
    const survey::CriticalMap& m = *map_;
    QString text = tr("%1 minima, %2 saddles, %3 maxima, %4 degenerate from %5 starts in %6 ms. ")
                       .arg(m.count(solve::PointKind::Minimum))
                       .arg(m.count(solve::PointKind::Saddle))
                       .arg(m.count(solve::PointKind::Maximum))
                       .arg(m.count(solve::PointKind::Degenerate))
                       .arg(m.starts)
                       .arg(m.seconds * 1e3, 0, 'f', 0);
    if (m.likelyComplete)
        text += tr("Every point was reached by at least two starts: the list is probably complete.");
    else
        text += tr("%n point(s) reached by one start only: more starts may find more (about %1 by the Chao 1984 "
                   "estimate).",
                   nullptr, m.foundOnce)
                    .arg(m.estimatedMissing, 0, 'g', 2);
    if (study_.variables.size() > 2)
        text += tr(" All %1 variables vary in the search; the landscape shows the plotted pair of each point.")
                    .arg(study_.variables.size());
    criticalSummary_->setText(text);
}

void SurveyController::showBasins(std::shared_ptr<const survey::BasinSurvey> result,
                                  std::shared_ptr<const Objective> objective) {
    if (objective != objective_ || !basinsOn_->isChecked()) return;
    basins_ = std::move(result);
    basinsView_->setMessage(QString());
    basinsView_->setSurvey(basins_);
    long runs = 0;
    double seconds = 0;
    for (const survey::BasinMap& m : basins_->maps) {
        runs += m.total();
        seconds += m.seconds;
    }
    QString text = tr("%1 runs in %2 s (%3 µs per run on every core).")
                       .arg(runs)
                       .arg(basins_->seconds, 0, 'f', 2)
                       .arg(runs > 0 ? seconds / static_cast<double>(runs) * 1e6 : 0.0, 0, 'f', 1);
    if (study_.variables.size() > 2) {
        QStringList held;
        for (std::size_t i = 0; i < study_.variables.size(); ++i)
            if (static_cast<int>(i) != study_.view.plotX && static_cast<int>(i) != study_.view.plotY)
                held << QStringLiteral("%1 = %2").arg(QString::fromStdString(study_.variables[i].name),
                                                      widgets::formatNumber(study_.variables[i].start));
        text += tr(" Others held at their start: %1.").arg(held.join(QStringLiteral(", ")));
    }
    basinsSummary_->setText(text);
    emit basinsShown();
}

Vector SurveyController::startNear(int point) const {
    if (!map_ || point < 0 || point >= static_cast<int>(map_->points.size()) || !objective_) return {};
    const survey::CriticalPoint& p = map_->points[static_cast<std::size_t>(point)];
    const survey::Region r = map_->region;
    const double step = 0.04 * 0.5 * (r.width(r.xVariable) + r.width(r.yVariable));
    Vector direction = p.lowestEigenvector;
    if (direction.size() != p.x.size() || !(direction.norm() > 0)) direction = Vector::Unit(p.x.size(), r.xVariable);
    direction.normalize();
    const Vector plus = p.x + step * direction, minus = p.x - step * direction;
    const double fPlus = objective_->value(plus), fMinus = objective_->value(minus);
    return !(fMinus < fPlus) ? plus : minus;  // NaN-safe: take plus unless minus is lower
}

void SurveyController::runFromPoint(int point) {
    const Vector start = startNear(point);
    if (start.size() == 0) return;
    table_->selectPoint(point);
    overlay_->setHighlighted(point);
    emit startRequested(start);
}

void SurveyController::setCriticalOn(bool on) { criticalOn_->setChecked(on); }
void SurveyController::setBasinsOn(bool on) { basinsOn_->setChecked(on); }
void SurveyController::setBasinGrid(int cells) { grid_->setValue(cells); }

void SurveyController::setBasinMethods(const QStringList& labels) {
    loading_ = true;
    for (int i = 0; i < methods_->count(); ++i)
        methods_->item(i)->setCheckState(labels.contains(methods_->item(i)->text()) ? Qt::Checked : Qt::Unchecked);
    loading_ = false;
    controlsEdited();
    basinDelay_.start();
}

}  // namespace sw::window
