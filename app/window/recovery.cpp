#include "app/window/recovery.h"

#include <QCoreApplication>
#include <QDir>
#include <QFile>
#include <QFileInfo>
#include <QJsonDocument>
#include <QJsonObject>
#include <QLockFile>
#include <QSaveFile>
#include <QStandardPaths>
#include <algorithm>
#include <atomic>

namespace sw::window {

namespace {

const QString kFormat = QStringLiteral("saddlewise-recovery");
constexpr int kVersion = 1;
// A recovery wrapper holds one study; anything far larger is not one of ours.
constexpr qint64 kMaxRecoveryBytes = 64LL * 1024 * 1024;

QString lockPathFor(const QString& file) {
    QString base = file;
    if (base.endsWith(QStringLiteral(".json"))) base.chop(5);
    return base + QStringLiteral(".lock");
}

// A lock is stale only when its process is gone: a window may run for days, so never by age.
std::unique_ptr<QLockFile> makeLock(const QString& file) {
    auto lock = std::make_unique<QLockFile>(lockPathFor(file));
    lock->setStaleLockTime(0);
    return lock;
}

}  // namespace

RecoverySlot::RecoverySlot(QString folder) : folder_(std::move(folder)) {
    // One file per window: the process id keeps processes apart, the serial keeps windows of
    // one process apart.
    static std::atomic<int> serial{0};
    file_ = QDir(folder_).filePath(
        QStringLiteral("%1-%2.json").arg(QCoreApplication::applicationPid()).arg(serial.fetch_add(1) + 1));
}

RecoverySlot::~RecoverySlot() { remove(); }

QString RecoverySlot::recoveryFolder() {
    return QDir(QStandardPaths::writableLocation(QStandardPaths::AppDataLocation)).filePath(QStringLiteral("recovery"));
}

bool RecoverySlot::exists() const { return QFileInfo::exists(file_); }

bool RecoverySlot::write(const RecoveredStudy& content, QString* error) {
    if (!QDir().mkpath(folder_)) {
        if (error) *error = QObject::tr("cannot create the folder %1").arg(folder_);
        return false;
    }
    if (!lock_) {
        lock_ = makeLock(file_);
        if (!lock_->tryLock(0)) {
            if (error) *error = QObject::tr("cannot lock %1 (error %2)").arg(lockPathFor(file_)).arg(static_cast<int>(lock_->error()));
            lock_.reset();
            return false;
        }
    }
    QJsonObject wrapper;
    wrapper["format"] = kFormat;
    wrapper["version"] = kVersion;
    wrapper["saved_at"] = content.savedAt.toUTC().toString(Qt::ISODate);
    wrapper["study_path"] = content.studyPath;
    wrapper["base_directory"] = content.baseDirectory;
    wrapper["copied_from"] = content.copiedFrom;
    wrapper["study"] = content.studyText;
    const QByteArray bytes = QJsonDocument(wrapper).toJson(QJsonDocument::Indented);
    QSaveFile out(file_);
    if (!out.open(QIODevice::WriteOnly) || out.write(bytes) != bytes.size() || !out.commit()) {
        if (error) *error = QObject::tr("cannot write %1: %2").arg(file_, out.errorString());
        return false;
    }
    return true;
}

void RecoverySlot::remove() {
    QFile::remove(file_);
    lock_.reset();  // unlocks and removes the lock file
}

std::vector<OrphanedRecovery> RecoverySlot::claimOrphans(const QString& folder) {
    std::vector<OrphanedRecovery> found;
    const QFileInfoList files = QDir(folder).entryInfoList({QStringLiteral("*.json")}, QDir::Files);
    for (const QFileInfo& info : files) {
        std::shared_ptr<QLockFile> lock = makeLock(info.absoluteFilePath());
        // Taken: its window is gone (a dead process's lock is removed as stale). Refused: a
        // running window's live work.
        if (!lock->tryLock(0)) continue;
        found.push_back({info.absoluteFilePath(), info.lastModified(), std::move(lock)});
    }
    std::sort(found.begin(), found.end(),
              [](const OrphanedRecovery& a, const OrphanedRecovery& b) { return a.modified > b.modified; });
    return found;
}

std::optional<RecoveredStudy> RecoverySlot::read(const QString& file, QString* error) {
    QFile in(file);
    if (!in.open(QIODevice::ReadOnly)) {
        if (error) *error = QObject::tr("cannot read %1: %2").arg(file, in.errorString());
        return std::nullopt;
    }
    if (in.size() > kMaxRecoveryBytes) {
        if (error) *error = QObject::tr("%1 is %2 bytes, too large for a recovery file").arg(file).arg(in.size());
        return std::nullopt;
    }
    QJsonParseError parse;
    const QJsonDocument document = QJsonDocument::fromJson(in.readAll(), &parse);
    if (parse.error != QJsonParseError::NoError) {
        if (error) *error = QObject::tr("%1: not JSON at offset %2: %3").arg(file).arg(parse.offset).arg(parse.errorString());
        return std::nullopt;
    }
    const QJsonObject wrapper = document.object();
    if (wrapper.value("format").toString() != kFormat || wrapper.value("version").toInt() != kVersion) {
        if (error) *error = QObject::tr("%1: not a Saddlewise recovery file (format %2 version %3 expected)")
                                .arg(file, kFormat).arg(kVersion);
        return std::nullopt;
    }
    if (!wrapper.value("study").isString()) {
        if (error) *error = QObject::tr("%1: study: a study's text was expected").arg(file);
        return std::nullopt;
    }
    RecoveredStudy read;
    read.studyText = wrapper.value("study").toString();
    read.studyPath = wrapper.value("study_path").toString();
    read.baseDirectory = wrapper.value("base_directory").toString();
    read.copiedFrom = wrapper.value("copied_from").toString();
    read.savedAt = QDateTime::fromString(wrapper.value("saved_at").toString(), Qt::ISODate);
    return read;
}

}  // namespace sw::window
