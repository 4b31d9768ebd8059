#include "app/report/install.h"

#include "app/cli/report_graphics.h"
#include "app/report/figures.h"
#include "app/report/pdf.h"

#include <QApplication>
#include <QDir>
#include <QFileInfo>
#include <QLibraryInfo>
#include <QStringList>
#include <cstdio>
#include <stdexcept>

namespace sw::reportgui {

namespace {

// Qt's chatter (font directories, runtime directories) is not the verb's output; critical and
// fatal messages still reach stderr.
void quietHandler(QtMsgType type, const QMessageLogContext&, const QString& message) {
    if (type == QtCriticalMsg || type == QtFatalMsg) fprintf(stderr, "saddlewise report: Qt: %s\n", qPrintable(message));
}

bool offscreenPluginPresent() {
    QStringList folders;
    const QString fromEnvironment = qEnvironmentVariable("QT_PLUGIN_PATH");
    if (!fromEnvironment.isEmpty()) folders << fromEnvironment.split(QDir::listSeparator(), Qt::SkipEmptyParts);
    folders << QLibraryInfo::path(QLibraryInfo::PluginsPath);
    for (const QString& folder : folders)
        if (QFileInfo::exists(folder + QStringLiteral("/platforms/libqoffscreen.so"))) return true;
    return false;
}

// The verb's application: created once, on first use, and kept for the life of the process
// (a QApplication must outlive every widget and font it made).
void ensureApplication() {
    if (QCoreApplication::instance()) {
        if (!qobject_cast<QApplication*>(QCoreApplication::instance()))
            throw std::runtime_error("a non-widget Qt application is already running");
        return;
    }
    if (!offscreenPluginPresent())
        throw std::runtime_error("Qt's offscreen platform plugin (platforms/libqoffscreen.so) was not found under " +
                                 QLibraryInfo::path(QLibraryInfo::PluginsPath).toStdString() +
                                 "; install Qt's GUI library (libqt6gui6) completely");
    qInstallMessageHandler(quietHandler);
    static int argc = 3;
    static char name[] = "saddlewise", option[] = "-platform", platform[] = "offscreen";
    static char* argv[] = {name, option, platform, nullptr};
    static QApplication* application = new QApplication(argc, argv);
    (void)application;
}

}  // namespace

void installReportGraphics() {
    cli::ReportGraphics graphics;
    graphics.figures = [](const report::StudyRuns& runs, const nlohmann::json& results, std::string* note) {
        ensureApplication();
        const LandscapePlan plan = sampleLandscape(runs, results);
        return drawFigures(runs, results, plan, note);
    };
    graphics.pdf = [](const report::Document& document) {
        ensureApplication();
        return writePdf(document);
    };
    cli::setReportGraphics(std::move(graphics));
}

}  // namespace sw::reportgui
