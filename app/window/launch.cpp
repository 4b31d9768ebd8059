// Placeholder window until the workbench lands (replaced by its owner).
#include "app/window/launch.h"

#include <QApplication>
#include <QLabel>
#include <QMainWindow>

namespace sw::window {

int launch(int argc, char** argv) {
    QApplication app(argc, argv);
    QApplication::setApplicationName("Saddlewise");
    QApplication::setOrganizationName("Saddlewise");
    QMainWindow window;
    window.setWindowTitle("Saddlewise");
    auto* label = new QLabel("Saddlewise workbench", &window);
    label->setAlignment(Qt::AlignCenter);
    window.setCentralWidget(label);
    window.resize(1280, 800);
    window.show();
    return app.exec();
}

}  // namespace sw::window
