// Window responsiveness, offscreen: (1) drag the start 200 times on a 2-D sample with six
// methods enabled and time each drag until the landscape has repainted the new paths;
// (2) recompute and redraw the landscape at 600 x 600 cells with contour lines, and (3) the
// same landscape phase by phase, to show where its time goes.
// A plain main printing a table (times are wall clock on this machine; no assertions).
#include "app/window/lineup_editor.h"
#include "app/window/main_window.h"
#include "core/analyze/analyze.h"
#include "widgets/landscape_view.h"

#include <QApplication>
#include <QElapsedTimer>
#include <QFileInfo>
#include <QThread>
#include <QStandardPaths>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

namespace {

struct Stats {
    double median = 0, p95 = 0, max = 0;
};

Stats summarise(std::vector<double> ms) {
    std::sort(ms.begin(), ms.end());
    auto at = [&](double q) { return ms[static_cast<std::size_t>(std::floor(q * static_cast<double>(ms.size() - 1)))]; };
    return {at(0.5), at(0.95), ms.back()};
}

// Processes events until `done` or timeout; returns false on timeout.
template <class Done>
bool pump(Done done, int timeoutMs = 20000) {
    QElapsedTimer clock;
    clock.start();
    while (!done()) {
        if (clock.elapsed() > timeoutMs) return false;
        QCoreApplication::processEvents(QEventLoop::AllEvents, 1);
    }
    return true;
}

}  // namespace

int main(int argc, char** argv) {
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM")) qputenv("QT_QPA_PLATFORM", "offscreen");
    QApplication app(argc, argv);
    QStandardPaths::setTestModeEnabled(true);
    QCoreApplication::setOrganizationName("SaddlewiseBench");
    QCoreApplication::setApplicationName("bench_gui");

    const QString sample = argc > 1 ? QString::fromLocal8Bit(argv[1])
                                    : QStringLiteral(SW_SAMPLES_DIR "/two-valve-saddles.json");
    sw::window::MainWindow window;
    window.resize(1600, 1000);
    window.show();
    QString error;
    if (!window.openStudy(sample, &error)) {
        std::fprintf(stderr, "bench_gui: %s\n", qPrintable(error));
        return 2;
    }
    window.waitForIdle();
    // Six methods enabled: enable entries until there are six (the sample has six entries).
    auto* lineup = window.lineupEditor();
    for (int i = 0; i < static_cast<int>(lineup->entries().size()); ++i)
        if (!lineup->entries()[static_cast<std::size_t>(i)].enabled) lineup->setEnabled(i, true);
    while (lineup->entries().size() < 6) lineup->addMethod("bfgs");
    window.waitForIdle();
    const int methods = static_cast<int>(window.snapshot()->tracks.size());

    QCustomPlot* plot = window.landscape()->plot();
    int replots = 0;
    QObject::connect(plot, &QCustomPlot::afterReplot, [&replots] { ++replots; });
    int runsShown = 0, fieldsShown = 0;
    QObject::connect(&window, &sw::window::MainWindow::runsShown, [&runsShown] { ++runsShown; });
    QObject::connect(&window, &sw::window::MainWindow::fieldShown, [&fieldsShown] { ++fieldsShown; });

    // (1) Drags: the start walks a small circle through the box, as a hand would.
    const sw::Vector centre = window.start();
    std::vector<double> dragMs;
    long iterates = 0;
    for (int k = 0; k < 200; ++k) {
        sw::Vector x = centre;
        const double t = 2 * M_PI * k / 200.0;
        x(0) = centre(0) + 0.25 * std::cos(t) - 0.25;
        x(1) = centre(1) + 0.25 * std::sin(t);
        const int runsBefore = runsShown, replotsBefore = replots;
        QElapsedTimer clock;
        clock.start();
        window.moveStart(x);  // what the landscape's startMoved signal calls
        if (!pump([&] { return runsShown > runsBefore; }) || !pump([&] { return replots > replotsBefore; })) {
            std::fprintf(stderr, "bench_gui: drag %d timed out\n", k);
            return 1;
        }
        dragMs.push_back(clock.nsecsElapsed() * 1e-6);
        for (const auto& track : window.snapshot()->tracks) iterates += static_cast<long>(track.run->trace.size());
    }
    window.waitForIdle();

    // (2) Landscape at 600 x 600 cells with contours: sample + levels + contour lines in the
    // job runner, then the landscape redraws.
    std::vector<double> fieldMs;
    for (int k = 0; k < 40; ++k) {
        sw::window::FieldRequest request;
        request.objective = window.objective();
        request.held = window.start();
        const auto& vars = window.study().variables;
        request.box = {vars[0].lower, vars[0].upper, vars[1].lower, vars[1].upper};
        request.nx = request.ny = 600;
        request.contourCount = 18;
        const int fieldsBefore = fieldsShown, replotsBefore = replots;
        QElapsedTimer clock;
        clock.start();
        window.jobs()->sampleField(request);
        if (!pump([&] { return fieldsShown > fieldsBefore; }) || !pump([&] { return replots > replotsBefore; })) {
            std::fprintf(stderr, "bench_gui: landscape %d timed out\n", k);
            return 1;
        }
        fieldMs.push_back(clock.nsecsElapsed() * 1e-6);
    }
    // (3) Where the landscape's time goes: each phase alone, on the same request.
    std::vector<double> sampleMs, levelMs, contourMs, rebuildMs, replotMs;
    {
        const auto& vars = window.study().variables;
        const sw::analyze::Box box{vars[0].lower, vars[0].upper, vars[1].lower, vars[1].upper};
        for (int k = 0; k < 15; ++k) {
            auto snap = std::make_shared<sw::widgets::FieldSnapshot>();
            QElapsedTimer clock;
            clock.start();
            sw::analyze::sampleField(*window.objective(), window.start(), 0, 1, box, 600, 600, snap->field);
            sampleMs.push_back(clock.nsecsElapsed() * 1e-6);
            clock.restart();
            const auto levels = sw::analyze::chooseLevels(snap->field, 18);
            levelMs.push_back(clock.nsecsElapsed() * 1e-6);
            clock.restart();
            snap->contours = sw::analyze::contourLines(snap->field, levels);
            contourMs.push_back(clock.nsecsElapsed() * 1e-6);
            clock.restart();
            window.landscape()->setField(snap);
            rebuildMs.push_back(clock.nsecsElapsed() * 1e-6);
            clock.restart();
            plot->replot(QCustomPlot::rpImmediateRefresh);
            replotMs.push_back(clock.nsecsElapsed() * 1e-6);
        }
    }

    std::size_t contourLines = 0;
    for (const auto& set : window.field()->contours) contourLines += set.lines.size();

    const Stats drag = summarise(dragMs), field = summarise(fieldMs);
    std::printf("bench_gui (offscreen, %d hardware threads), sample %s\n", QThread::idealThreadCount(),
                qPrintable(QFileInfo(sample).fileName()));
    std::printf("%-44s %8s %8s %8s %8s\n", "measure", "n", "median", "p95", "max");
    std::printf("%-44s %8zu %7.2fms %7.2fms %7.2fms\n",
                qPrintable(QString("drag start -> repaint (%1 methods)").arg(methods)), dragMs.size(), drag.median,
                drag.p95, drag.max);
    std::printf("%-44s %8zu %7.2fms %7.2fms %7.2fms\n", "landscape 600x600 + contours -> repaint", fieldMs.size(),
                field.median, field.p95, field.max);
    for (const auto& [name, ms] : {std::pair<const char*, std::vector<double>*>{"  phase: sample 600x600 (worker)", &sampleMs},
                                   {"  phase: choose levels (worker)", &levelMs},
                                   {"  phase: contour lines (worker)", &contourMs},
                                   {"  phase: landscape rebuild (GUI thread)", &rebuildMs},
                                   {"  phase: replot (GUI thread)", &replotMs}}) {
        const Stats s = summarise(*ms);
        std::printf("%-44s %8zu %7.2fms %7.2fms %7.2fms\n", name, ms->size(), s.median, s.p95, s.max);
    }
    std::printf("mean iterates per drag over all methods: %.1f; contour polylines at 600x600: %zu\n",
                static_cast<double>(iterates) / 200.0, contourLines);
    std::printf("targets: drag p95 <= 16 ms; landscape <= 50 ms\n");
    return 0;
}
