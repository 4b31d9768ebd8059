#include "app/window/launch.h"

#include "app/window/main_window.h"
#include "core/study/provenance.h"

#include <QApplication>
#include <QDir>
#include <QFileInfo>
#include <QMessageBox>
#include <QTimer>
#include <cstdio>

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

}  // namespace

int launch(int argc, char** argv) {
    QApplication app(argc, argv);
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
    const QString shot = qEnvironmentVariable("SADDLEWISE_SCREENSHOT");
    if (!shot.isEmpty()) {
        const QString size = qEnvironmentVariable("SADDLEWISE_SCREENSHOT_SIZE");  // e.g. 1600x1000
        const QStringList wh = size.split('x');
        if (wh.size() == 2) window.resize(wh[0].toInt(), wh[1].toInt());
        scheduleScreenshot(window, QFileInfo(shot).absoluteFilePath());
    }
    window.show();
    return app.exec();
}

}  // namespace sw::window
