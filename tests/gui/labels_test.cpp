// Labels say one thing each (docs/names.md): an end point is a *local* minimum, the Steps
// table's step column and the local model's legend do not repeat the method id, the legend
// names the user's label, the colour bar says its reference is the lowest f on this plane,
// and the progress view says what f_best is and where runs at f_best are drawn.
#include "core/analyze/analyze.h"
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"
#include "widgets/landscape_view.h"
#include "widgets/local_model_view.h"
#include "widgets/plot_style.h"
#include "widgets/progress_view.h"
#include "widgets/steps_table.h"

#include <QtTest>

#include <memory>

using namespace sw;
using namespace sw::widgets;

namespace {

const char* kValley = "(1 - x)^2 + 100*(y - x^2)^2";  // Rosenbrock's valley, minimum (1, 1)

std::shared_ptr<const Objective> valley() {
    return std::make_shared<FormulaObjective>(kValley, std::vector<std::string>{"x", "y"});
}

RunTrack track(const std::string& method, const QString& label, const Objective& objective, int maxIterations = 400) {
    solve::StoppingRules rules;
    rules.maxIterations = maxIterations;
    RunTrack t;
    t.label = label;
    t.colour = QColor(0x04, 0x7f, 0xb2);
    t.run = std::make_shared<solve::Run>(solve::solve(method, objective, (Vector(2) << -1.2, 1.0).finished(), {}, rules));
    t.usesTrustRegion = method.rfind("trust-region", 0) == 0;
    return t;
}

std::shared_ptr<Snapshot> snapshotOf(std::vector<RunTrack> tracks) {
    auto snapshot = std::make_shared<Snapshot>();
    snapshot->objective = valley();
    snapshot->variableNames = {QStringLiteral("x"), QStringLiteral("y")};
    snapshot->held = Vector::Zero(2);
    snapshot->tracks = std::move(tracks);
    return snapshot;
}

QStringList legendNames(QCustomPlot* plot) {
    QStringList names;
    for (int i = 0; i < plot->legend->itemCount(); ++i)
        if (auto* item = qobject_cast<QCPPlottableLegendItem*>(plot->legend->item(i)))
            names << item->plottable()->name();
    return names;
}

}  // namespace

class LabelsTest : public QObject {
    Q_OBJECT

private slots:
    void stepDescriptionSaysWhatTheMethodNameDoesNot() {
        solve::IterationRecord r;
        r.stepKind = solve::StepKind::QuasiNewton;
        QCOMPARE(stepDescription("bfgs", r), QString());
        r.stepKind = solve::StepKind::Newton;
        QCOMPARE(stepDescription("newton", r), QString());
        QCOMPARE(stepDescription("damped-newton", r), QString());
        QCOMPARE(stepDescription("modified-newton", r), QStringLiteral("newton"));  // no shift was needed
        r.stepKind = solve::StepKind::Gradient;
        QCOMPARE(stepDescription("gradient-descent", r), QString());
        QCOMPARE(stepDescription("damped-newton", r), QStringLiteral("steepest-descent fallback"));
        r.stepKind = solve::StepKind::Boundary;
        QCOMPARE(stepDescription("trust-region-cg", r), QStringLiteral("boundary"));
        r.stepKind = solve::StepKind::LevenbergMarquardt;
        r.damping = 0.3;
        QCOMPARE(stepDescription("levenberg-marquardt", r), QStringLiteral("damped"));
        r.damping = 0;
        QCOMPARE(stepDescription("levenberg-marquardt", r), QStringLiteral("undamped"));
        r.stepKind = solve::StepKind::Simplex;
        r.note = "contract inside; simplex size 0.1, value spread 0.2";
        QCOMPARE(stepDescription("nelder-mead", r), QStringLiteral("contract inside"));
        r.stepKind = solve::StepKind::None;
        QCOMPARE(stepDescription("bfgs", r), QString());
    }

    void theStepsTableDoesNotRepeatTheMethodInItsStepColumn() {
        auto snapshot = snapshotOf({track("bfgs", "my BFGS", *valley()), track("nelder-mead", "simplex", *valley()),
                                    track("trust-region-dogleg", "dogleg", *valley())});
        StepsModel model;
        model.setSnapshot(snapshot);
        QVERIFY(model.rowCount() > 10);
        QSet<QString> seen;
        for (int row = 0; row < model.rowCount(); ++row) {
            const QString step = model.data(model.index(row, StepsModel::StepKindColumn)).toString();
            const QString method = model.data(model.index(row, StepsModel::Method)).toString();
            QVERIFY2(step != "quasi-newton" && step != "simplex" && step != "bfgs" && step != "nelder-mead",
                     qPrintable(method + ": " + step));
            seen.insert(step);
        }
        QVERIFY2(seen.contains("reflect") || seen.contains("expand"), qPrintable(QStringList(seen.values()).join(", ")));
        QVERIFY(seen.contains("dogleg") || seen.contains("interior") || seen.contains("boundary"));
    }

    void theLocalModelLegendNamesTheUsersLabel() {
        auto snapshot = snapshotOf({track("bfgs", "my BFGS", *valley())});
        LocalModelView view;
        view.setSnapshot(snapshot);
        view.setSelection(Selection{0, 1});
        view.resize(640, 520);
        view.show();
        view.plot()->replot();
        const QStringList names = legendNames(view.plot());
        QVERIFY2(names.contains("step of my BFGS"), qPrintable(names.join(" | ")));
        for (const QString& name : names) QVERIFY2(!name.contains("quasi-newton") && !name.contains("bfgs"), qPrintable(name));
    }

    void endPointsAreLocalAndTheColourBarNamesItsReference() {
        auto objective = valley();
        auto snapshot = snapshotOf({track("bfgs", "BFGS", *objective)});
        auto field = std::make_shared<FieldSnapshot>();
        const analyze::Box box{-2, 2, -1, 3};
        QVERIFY(analyze::sampleField(*objective, Vector::Zero(2), 0, 1, box, 60, 60, field->field));
        LandscapeView view;
        view.setSnapshot(snapshot);
        view.setField(field);
        view.setLogColour(true);
        view.resize(640, 520);
        view.show();
        view.plot()->replot();
        const QStringList names = legendNames(view.plot());
        QVERIFY2(names.join("|").contains("ends at a local minimum"), qPrintable(names.join(" | ")));
        bool found = false;
        // The colour scale may sit in a nested grid beside the axis rect: search recursively.
        for (QCPLayoutElement* element : view.plot()->plotLayout()->elements(true))
            if (auto* scale = qobject_cast<QCPColorScale*>(element)) {
                QVERIFY2(scale->axis()->label().contains("lowest f on this plane"), qPrintable(scale->axis()->label()));
                QVERIFY(!scale->axis()->label().contains("f_min"));
                found = true;
                // In a short panel (1280 x 800 window) the title shortens to fit the bar
                // instead of being cut at both ends.
                for (const QSize size : {QSize(430, 300), QSize(430, 220)}) {
                    view.resize(size);
                    view.plot()->replot();
                    const QString label = scale->axis()->label();
                    const int room = scale->axis()->axisRect()->rect().height();
                    QVERIFY2(QFontMetrics(scale->axis()->labelFont()).horizontalAdvance(label) <= room ||
                                 label == QStringLiteral("f − min, log"),
                             qPrintable(QStringLiteral("%1 in %2 px").arg(label).arg(room)));
                    QVERIFY2(label.startsWith(QStringLiteral("f − ")), qPrintable(label));
                }
            }
        QVERIFY(found);
    }

    void theProgressViewSaysWhatFBestIsAndWhereZeroGapsAreDrawn() {
        ProgressView view;
        view.setSnapshot(snapshotOf({track("bfgs", "BFGS", *valley()), track("gradient-descent", "steepest", *valley(), 50)}));
        view.resize(640, 520);
        view.show();
        view.plot()->replot();
        QString note;
        for (int i = 0; i < view.plot()->plotLayout()->elementCount(); ++i)
            if (auto* text = qobject_cast<QCPTextElement*>(view.plot()->plotLayout()->elementAt(i))) note += text->text();
        QVERIFY2(note.contains("the lowest f any run reached"), qPrintable(note));
        QVERIFY2(note.contains("runs at f_best are drawn at"), qPrintable(note));
        QVERIFY(!note.contains("zero gap"));
    }
};

QTEST_MAIN(LabelsTest)
#include "labels_test.moc"
