#include "app/window/launch.h"

#include "app/window/main_window.h"
#include "app/window/objective_editor.h"
#include "core/study/provenance.h"

#include <QApplication>
#include <QDir>
#include <QDockWidget>
#include <QFileInfo>
#include <QMessageBox>
#include <QPlainTextEdit>
#include <QTimer>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>
#include <vector>

namespace sw::window {

namespace {

// Screenshot mode (for scripts/screenshots, not advertised): with SADDLEWISE_SCREENSHOT set
// to a PNG path, the window waits for its jobs, grabs itself into that file and quits.
void scheduleScreenshot(MainWindow& window, const QString& path) {
    QTimer::singleShot(300, &window, [&window, path] {
        window.waitForIdle(60000);
        // Let queued replots land before grabbing.
        for (int i = 0; i < 10; ++i) QCoreApplication::processEvents();
        QTimer::singleShot(400, &window, [&window, path] {
            QCoreApplication::processEvents();
            const bool saved = window.grab().save(path);
            std::fprintf(stderr, "%s %s\n", saved ? "saved" : "could not save", qPrintable(path));
            QCoreApplication::exit(saved ? 0 : 1);
        });
    });
}

// ---- no display: one line and exit 2, never Qt's abort ----------------------------------

const char* kHeadlessHint = "the headless verbs need none (saddlewise --help)";

bool environmentSet(const char* name) {
    const char* value = std::getenv(name);
    return value && *value;
}

// The platforms Qt will try, in order: `-platform NAME` on the command line, else
// QT_QPA_PLATFORM, else Qt's default (xcb on Debian; wayland first in a Wayland session).
std::vector<std::string> platformCandidates(int argc, char** argv) {
    std::string list;
    for (int i = 1; i + 1 < argc; ++i)
        if (std::strcmp(argv[i], "-platform") == 0) list = argv[i + 1];
    if (list.empty() && environmentSet("QT_QPA_PLATFORM")) list = std::getenv("QT_QPA_PLATFORM");
    if (list.empty()) list = environmentSet("WAYLAND_DISPLAY") ? "wayland;xcb" : "xcb";
    std::vector<std::string> names;
    std::size_t start = 0;
    while (start <= list.size()) {
        const std::size_t end = std::min(list.find(';', start), list.size());
        std::string name = list.substr(start, end - start);
        name = name.substr(0, name.find(':'));  // "xcb:option" -> "xcb"
        if (!name.empty()) names.push_back(name);
        start = end + 1;
    }
    return names;
}

// Empty when some platform Qt will try has a display to talk to; else the reason it has none.
// (A display named but unreachable is caught by the message handler below.)
std::string missingDisplay(int argc, char** argv) {
    std::string reasons;
    for (const std::string& name : platformCandidates(argc, argv)) {
        std::string reason;
        if (name == "xcb") {
            if (!environmentSet("DISPLAY")) reason = "DISPLAY is not set";
        } else if (name.rfind("wayland", 0) == 0) {
            if (!environmentSet("WAYLAND_DISPLAY")) reason = "WAYLAND_DISPLAY is not set";
        }
        if (reason.empty()) return "";  // offscreen, minimal, vnc, eglfs, ... or a named display
        reasons += (reasons.empty() ? "" : ", ") + reason;
    }
    return reasons.empty() ? "no Qt platform is named" : reasons;
}

// While QApplication starts, Qt's messages are held back; a fatal one (no platform plugin could
// be initialised, e.g. DISPLAY names a display that does not answer) becomes our one line and
// exit 2 instead of an abort. Once the application is up, the held messages are passed on.
QtMessageHandler previousHandler = nullptr;
std::vector<std::pair<QtMsgType, QString>> heldMessages;
std::string firstWarning;  // the reason named in the line, e.g. "could not connect to display :7"

void startupMessageHandler(QtMsgType type, const QMessageLogContext&, const QString& message) {
    if (type == QtFatalMsg) {
        const std::string reason = firstWarning.empty() ? message.section('\n', 0, 0).toStdString() : firstWarning;
        std::fprintf(stderr, "saddlewise: cannot open the window: no display could be opened (%s); %s\n",
                     reason.c_str(), kHeadlessHint);
        std::fflush(stderr);
        std::_Exit(2);
    }
    if (firstWarning.empty() && type == QtWarningMsg) firstWarning = message.section('\n', 0, 0).toStdString();
    heldMessages.emplace_back(type, message);
}

void releaseHeldMessages() {
    qInstallMessageHandler(previousHandler);
    for (const auto& [type, message] : heldMessages)
        if (type == QtWarningMsg || type == QtCriticalMsg) std::fprintf(stderr, "%s\n", qPrintable(message));
    heldMessages.clear();
}

}  // namespace

int launch(int argc, char** argv) {
    if (const std::string reason = missingDisplay(argc, argv); !reason.empty()) {
        std::fprintf(stderr, "saddlewise: cannot open the window: no display (%s); %s\n", reason.c_str(), kHeadlessHint);
        return 2;
    }
    previousHandler = qInstallMessageHandler(startupMessageHandler);
    QApplication app(argc, argv);
    releaseHeldMessages();
    QApplication::setApplicationName("Saddlewise");
    QApplication::setOrganizationName("Saddlewise");
    QApplication::setApplicationVersion(QString::fromLatin1(study::programVersion()));
    MainWindow window;
    const QStringList args = QApplication::arguments();
    if (args.size() > 1) {
        QString error;
        if (!window.openStudy(args.at(1), &error)) {
            std::fprintf(stderr, "saddlewise: %s\n", qPrintable(error));
            if (qEnvironmentVariableIsSet("SADDLEWISE_SCREENSHOT")) return 2;
            QTimer::singleShot(0, &window, [&window, error] {
                QMessageBox::warning(&window, QObject::tr("Cannot open study"), error);
            });
        }
    }
    // SADDLEWISE_AUTOSAVE_MS: how often unsaved work is kept aside (default 30 s); tests use a
    // few hundred ms. SADDLEWISE_TEST_FORMULA: a test hook that types this formula into the
    // editor after the study given on the command line is open, so a test can give a real process an unsaved edit.
    if (const int ms = qEnvironmentVariableIntValue("SADDLEWISE_AUTOSAVE_MS"); ms > 0) window.setAutosaveInterval(ms);
    if (const QString typed = qEnvironmentVariable("SADDLEWISE_TEST_FORMULA"); !typed.isEmpty())
        window.objectiveEditor()->formulaEdit()->setPlainText(typed);
    const QString shot = qEnvironmentVariable("SADDLEWISE_SCREENSHOT");
    if (!shot.isEmpty()) {
        const QString size = qEnvironmentVariable("SADDLEWISE_SCREENSHOT_SIZE");  // e.g. 1600x1000
        const QStringList wh = size.split('x');
        if (wh.size() == 2) window.setInitialSize(QSize(wh[0].toInt(), wh[1].toInt()));
        // SADDLEWISE_SCREENSHOT_RAISE=basins,critical-points brings those tabbed panels to the front.
        for (const QString& name : qEnvironmentVariable("SADDLEWISE_SCREENSHOT_RAISE").split(',', Qt::SkipEmptyParts))
            for (QDockWidget* dock : window.findChildren<QDockWidget*>())
                if (dock->objectName() == name) dock->raise();
        scheduleScreenshot(window, QFileInfo(shot).absoluteFilePath());
    }
    window.show();
    // Work a crashed or killed window left behind is offered once this one is on screen (never
    // in the screenshot mode, which must not wait for an answer).
    if (shot.isEmpty()) QTimer::singleShot(0, &window, [&window] { window.offerRecovery(); });
    return app.exec();
}

}  // namespace sw::window
