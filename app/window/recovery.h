#pragma once
// Recovery files: the study as it is on screen, written aside while it has unsaved edits, so a
// crash or a kill loses at most the last few seconds of work.
//
// Each window writes its own file in `<AppDataLocation>/recovery/` (named after the process id and
// a per-process serial) and holds a QLockFile beside it for as long as it lives. A file whose lock
// can be taken belongs to a window that is gone (its process died: the lock is stale) and may be
// offered; a file whose lock a running process holds is that process's live work and is left
// alone. Locks are never judged stale by age (a window may run for days).
//
// The file is a small wrapper (the study document has no room for where it belongs):
//   { "format": "saddlewise-recovery", "version": 1, "saved_at": "2024-05-01T10:00:00Z",
//     "study_path": "/home/me/fit.json", "base_directory": "/home/me", "copied_from": "",
//     "study": "<the study file's text, as core/study writes it>" }

#include <QDateTime>
#include <QString>
#include <memory>
#include <optional>
#include <vector>

class QLockFile;

namespace sw::window {

struct RecoveredStudy {
    QString studyText;      // study::toJson of the study on screen (unparsed fields included)
    QString studyPath;      // the file it was opened from or last saved to; "" for a new study
    QString baseDirectory;  // the folder its data path is relative to; "" when it has none yet
    QString copiedFrom;     // the sample an untitled copy was opened from
    QDateTime savedAt;      // when the recovery file was written (UTC)
};

// A recovery file left by a window that is gone, claimed (its lock held) while it is offered.
struct OrphanedRecovery {
    QString file;
    QDateTime modified;
    std::shared_ptr<QLockFile> lock;  // released (and its file removed) when the last copy goes
};

class RecoverySlot {
public:
    // folder: where recovery files live; recoveryFolder() unless a test says otherwise.
    explicit RecoverySlot(QString folder = recoveryFolder());
    ~RecoverySlot();  // a window that ends normally leaves nothing behind
    RecoverySlot(const RecoverySlot&) = delete;
    RecoverySlot& operator=(const RecoverySlot&) = delete;

    // `<AppDataLocation>/recovery`.
    static QString recoveryFolder();

    // Writes the wrapper atomically (QSaveFile), taking the lock first. False with the reason.
    bool write(const RecoveredStudy& content, QString* error = nullptr);
    // Removes this window's file (nothing unsaved any more) and lets go of the lock.
    void remove();
    // This window's file (it may not exist yet).
    QString filePath() const { return file_; }
    bool exists() const;

    // Files in `folder` whose window is gone, newest first, each claimed until dropped.
    static std::vector<OrphanedRecovery> claimOrphans(const QString& folder = recoveryFolder());
    // Reads a wrapper; nullopt with the reason when it is not one.
    static std::optional<RecoveredStudy> read(const QString& file, QString* error = nullptr);

private:
    QString folder_;
    QString file_;
    std::unique_ptr<QLockFile> lock_;
};

}  // namespace sw::window
