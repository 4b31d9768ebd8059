#pragma once
// The folder file dialogs start in: the last folder the user opened or saved anything in
// (kept in QSettings, "window/last-folder"), else the home folder.

#include <QString>

namespace sw::window {

QString lastUsedFolder();
// Remembers the folder of `fileOrFolder` (a file path or a folder path).
void rememberFolder(const QString& fileOrFolder);
// `fileName` in the last used folder, for a save dialog's suggestion.
QString suggestedPath(const QString& fileName);

}  // namespace sw::window
