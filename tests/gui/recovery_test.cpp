// Recovery after a crash (app/window/recovery.h), end to end: the real saddlewise program runs
// as a process on the offscreen platform with an unsaved edit (SADDLEWISE_TEST_FORMULA types a
// formula into the study opened from the command line; SADDLEWISE_AUTOSAVE_MS makes it keep the
// work aside every 150 ms) and is killed with SIGKILL. A window made here afterwards, with the
// same data location, offers the study: Yes restores exactly the edited formula and variables in
// their place, Cancel keeps the file, No removes it, and a clean close leaves no recovery file. While the process
// runs its file is not offered. Internal behaviour: no outside reference.
//
// The data location is isolated: XDG_DATA_HOME, XDG_CONFIG_HOME and HOME point into a temporary
// folder before QApplication starts (main below), for this process and the program alike.
#include "app/window/main_window.h"
#include "app/window/recovery.h"
#include "core/study/study.h"

#include <QDir>
#include <QElapsedTimer>
#include <QFile>
#include <QProcess>
#include <QStandardPaths>
#include <QTemporaryDir>
#include <QUndoStack>
#include <QtTest>
#include <memory>

using sw::window::MainWindow;

namespace {

QTemporaryDir* isolated = nullptr;  // made in main, before QApplication

// The study the program opens: our own, with starts and ranges no default study has.
const char* kStudy = R"({
  "format": "saddlewise-study",
  "version": 1,
  "title": "Recovery check",
  "objective": { "formula": "(a - 3)^2 + 2*(b + 0.5)^2" },
  "variables": [
    { "name": "a", "start": 0.1, "plot_from": -1, "plot_to": 5 },
    { "name": "b", "start": -2.25, "plot_from": -3, "plot_to": 2 }
  ],
  "methods": [
    { "label": "BFGS", "method": "bfgs", "options": {}, "colour": "#f4056e", "marker": "diamond", "enabled": true }
  ],
  "view": { "plot_x": "a", "plot_y": "b" }
}
)";
const char* kTypedFormula = "(a - 3)^2 + 2*(b + 0.5)^2 + 0.25*a*b";

QString recoveryFolder() {
    return QDir(isolated->path()).filePath(QStringLiteral("data/Saddlewise/Saddlewise/recovery"));
}

QStringList filesIn(const QString& folder) {
    return QDir(folder).entryList({QStringLiteral("*.json"), QStringLiteral("*.lock")}, QDir::Files);
}

struct Asked {
    int count = 0;
    QString text;
};

MainWindow::Question answering(Asked* asked, QMessageBox::StandardButton answer) {
    return [asked, answer](QWidget*, const QString&, const QString& text, QMessageBox::StandardButtons) {
        ++asked->count;
        asked->text = text;
        return answer;
    };
}

}  // namespace

class RecoveryTest : public QObject {
    Q_OBJECT

    QString studyPath_;

    // Starts the program on the study with an unsaved edit and waits until its recovery file
    // holds the edit. Returns the file ("" on failure, with the program's output in *log).
    QString startEditingProgram(QProcess& program, QString* log) {
        QProcessEnvironment env = QProcessEnvironment::systemEnvironment();  // the isolated XDG_* and HOME
        env.insert("QT_QPA_PLATFORM", "offscreen");
        env.insert("SADDLEWISE_AUTOSAVE_MS", "150");
        env.insert("SADDLEWISE_TEST_FORMULA", QString::fromLatin1(kTypedFormula));
        program.setProcessEnvironment(env);
        program.setProcessChannelMode(QProcess::MergedChannels);
        program.start(QStringLiteral(SW_EXECUTABLE), {studyPath_});
        if (!program.waitForStarted(30000)) {
            *log = program.errorString();
            return {};
        }
        const QString file = QDir(recoveryFolder()).filePath(QStringLiteral("%1-1.json").arg(program.processId()));
        QElapsedTimer waited;
        waited.start();
        while (waited.elapsed() < 120000 && program.state() == QProcess::Running) {
            QFile in(file);
            if (in.open(QIODevice::ReadOnly) && in.readAll().contains("0.25*a*b")) return file;
            QTest::qWait(50);
        }
        *log = QString::fromLocal8Bit(program.readAll());
        return {};
    }

    static void kill(QProcess& program) {
        program.kill();  // SIGKILL: no destructor, no close, the file stays
        QVERIFY(program.waitForFinished(30000));
        QCOMPARE(program.exitStatus(), QProcess::CrashExit);
    }

private slots:
    void initTestCase() {
        QCoreApplication::setOrganizationName("Saddlewise");  // the program's data location
        QCoreApplication::setApplicationName("Saddlewise");
        QCOMPARE(sw::window::RecoverySlot::recoveryFolder(), recoveryFolder());
        QDir().mkpath(isolated->filePath("work"));
        studyPath_ = QDir(isolated->filePath("work")).filePath("recovery-check.json");
        QFile out(studyPath_);
        QVERIFY(out.open(QIODevice::WriteOnly));
        out.write(kStudy);
    }

    void aKilledProgramsWorkIsOfferedAndYesRestoresIt() {
        QProcess program;
        QString log;
        const QString file = startEditingProgram(program, &log);
        QVERIFY2(!file.isEmpty(), qPrintable(log));

        {   // While the program runs, its file is its own live work: not offered.
            MainWindow bystander;
            Asked asked;
            bystander.setQuestion(answering(&asked, QMessageBox::Yes));
            QVERIFY(!bystander.offerRecovery());
            QCOMPARE(asked.count, 0);
            QVERIFY(QFile::exists(file));
        }

        kill(program);
        if (QTest::currentTestFailed()) return;
        QVERIFY(QFile::exists(file));

        MainWindow window;
        Asked asked;
        window.setQuestion(answering(&asked, QMessageBox::Yes));
        QVERIFY(window.offerRecovery());
        QCOMPARE(asked.count, 1);
        QVERIFY2(asked.text.contains("recovery-check.json"), qPrintable(asked.text));
        const sw::study::Study shown = window.onScreenStudy();
        QCOMPARE(QString::fromStdString(shown.formula), QString::fromLatin1(kTypedFormula));
        QCOMPARE(shown.variables.size(), std::size_t{2});
        QCOMPARE(shown.variables[0].name, std::string("a"));
        QCOMPARE(shown.variables[0].start, 0.1);
        QCOMPARE(shown.variables[0].lower, -1.0);
        QCOMPARE(shown.variables[0].upper, 5.0);
        QCOMPARE(shown.variables[1].name, std::string("b"));
        QCOMPARE(shown.variables[1].start, -2.25);
        QCOMPARE(shown.variables[1].lower, -3.0);
        QCOMPARE(shown.variables[1].upper, 2.0);
        QCOMPARE(shown.methods.size(), std::size_t{1});
        QCOMPARE(window.studyPath(), QFileInfo(studyPath_).absoluteFilePath());  // it keeps its place
        QVERIFY(window.isModified());
        QVERIFY(window.isRecovered());
        QVERIFY2(window.windowTitle().contains("recovered"), qPrintable(window.windowTitle()));
        QCOMPARE(window.undoStack()->count(), 0);
        QVERIFY(!QFile::exists(file));                   // the dead program's file is gone ...
        QVERIFY(QFile::exists(window.recoveryFile()));   // ... this window keeps the work aside now
        QVERIFY(window.waitForIdle());
        QVERIFY(window.objective());

        // A second offer finds nothing: the restored work is this window's live file.
        MainWindow other;
        Asked again;
        other.setQuestion(answering(&again, QMessageBox::Yes));
        QVERIFY(!other.offerRecovery());
        QCOMPARE(again.count, 0);

        // A clean close (the unsaved changes discarded) leaves nothing to recover.
        Asked closing;
        window.setQuestion(answering(&closing, QMessageBox::Discard));
        QVERIFY(window.close());
        QCOMPARE(closing.count, 1);
        QVERIFY2(filesIn(recoveryFolder()).isEmpty(), qPrintable(filesIn(recoveryFolder()).join(", ")));
    }

    void cancelKeepsAndNoDiscardsTheKilledProgramsWork() {
        QProcess program;
        QString log;
        const QString file = startEditingProgram(program, &log);
        QVERIFY2(!file.isEmpty(), qPrintable(log));
        kill(program);
        if (QTest::currentTestFailed()) return;

        MainWindow window;
        Asked later;  // Cancel (or Escape) keeps the work for the next start
        window.setQuestion(answering(&later, QMessageBox::Cancel));
        QVERIFY(!window.offerRecovery());
        QCOMPARE(later.count, 1);
        QVERIFY(QFile::exists(file));

        Asked asked;
        window.setQuestion(answering(&asked, QMessageBox::No));
        QVERIFY(!window.offerRecovery());
        QCOMPARE(asked.count, 1);
        QVERIFY(!QFile::exists(file));
        QVERIFY(!window.isModified());
        QVERIFY(!window.isRecovered());
        QVERIFY(QString::fromStdString(window.onScreenStudy().formula) != QString::fromLatin1(kTypedFormula));
        QVERIFY(window.close());  // nothing unsaved: no question, no file
        QVERIFY2(filesIn(recoveryFolder()).isEmpty(), qPrintable(filesIn(recoveryFolder()).join(", ")));
    }

    void savingRemovesTheFile() {
        MainWindow window;
        Asked asked;
        window.setQuestion(answering(&asked, QMessageBox::Discard));
        window.setAutosaveInterval(50);
        QString error;
        QVERIFY2(window.openStudy(studyPath_, &error), qPrintable(error));
        window.moveStart(sw::Vector::Constant(2, 1.5));
        QVERIFY(window.isModified());
        QTRY_VERIFY_WITH_TIMEOUT(!window.recoveryFile().isEmpty() && QFile::exists(window.recoveryFile()), 10000);
        const QString copy = isolated->filePath("work/saved-copy.json");
        QVERIFY2(window.saveStudy(copy, &error), qPrintable(error));
        QVERIFY(!QFile::exists(window.recoveryFile()));
        QVERIFY(filesIn(recoveryFolder()).isEmpty());
    }
};

int main(int argc, char** argv) {
    // The data and settings locations are read from the environment: set them before anything
    // (QApplication, QSettings, the program started later) looks.
    QTemporaryDir dir;
    if (!dir.isValid()) return 1;
    isolated = &dir;
    qputenv("XDG_DATA_HOME", QFile::encodeName(dir.filePath("data")));
    qputenv("XDG_CONFIG_HOME", QFile::encodeName(dir.filePath("config")));
    qputenv("XDG_CACHE_HOME", QFile::encodeName(dir.filePath("cache")));
    qputenv("HOME", QFile::encodeName(dir.filePath("home")));
    QDir().mkpath(dir.filePath("home"));
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM")) qputenv("QT_QPA_PLATFORM", "offscreen");
    QApplication app(argc, argv);
    RecoveryTest test;
    return QTest::qExec(&test, argc, argv);
}

#include "recovery_test.moc"
