#include "app/window/file_dialogs.h"

#include <QDir>
#include <QFileInfo>
#include <QSettings>

namespace sw::window {

namespace {
const char* kKey = "window/last-folder";
}

QString lastUsedFolder() {
    const QString folder = QSettings().value(kKey).toString();
    return !folder.isEmpty() && QFileInfo(folder).isDir() ? folder : QDir::homePath();
}

void rememberFolder(const QString& fileOrFolder) {
    if (fileOrFolder.isEmpty()) return;
    const QFileInfo info(fileOrFolder);
    QSettings().setValue(kKey, info.isDir() ? info.absoluteFilePath() : info.absolutePath());
}

QString suggestedPath(const QString& fileName) { return QDir(lastUsedFolder()).filePath(fileName); }

}  // namespace sw::window
