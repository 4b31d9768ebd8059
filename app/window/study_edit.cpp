#include "app/window/study_edit.h"

#include <QHash>
#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QSet>
#include <QStringList>

namespace sw::window {

namespace {

// Text and numbers are what typing changes (a number field holds the text typed while it does
// not read as a number, so a typed value may switch between the two).
bool typedLeaf(const QJsonValue& v) { return v.isString() || v.isDouble(); }

// Collects the places where a and b differ (at most two: one is a field, two are several).
void collectDifferences(const QJsonValue& a, const QJsonValue& b, const QString& place, QStringList& places,
                        bool& structural) {
    if (places.size() > 1 || a == b) return;
    if (a.isObject() && b.isObject()) {
        const QJsonObject oa = a.toObject(), ob = b.toObject();
        QStringList keys = oa.keys();
        for (const QString& key : ob.keys())
            if (!oa.contains(key)) keys << key;
        for (const QString& key : keys) {
            const QString inner = place.isEmpty() ? key : place + '.' + key;
            if (!oa.contains(key) || !ob.contains(key)) {
                places << inner;
                structural = true;
            } else {
                collectDifferences(oa.value(key), ob.value(key), inner, places, structural);
            }
            if (places.size() > 1) return;
        }
        return;
    }
    if (a.isArray() && b.isArray()) {
        const QJsonArray aa = a.toArray(), ab = b.toArray();
        if (aa.size() != ab.size()) {
            places << place;
            structural = true;
            return;
        }
        for (qsizetype i = 0; i < aa.size() && places.size() <= 1; ++i)
            collectDifferences(aa.at(i), ab.at(i), QStringLiteral("%1[%2]").arg(place).arg(i), places, structural);
        return;
    }
    places << place;
    if (!typedLeaf(a) || !typedLeaf(b)) structural = true;
}

}  // namespace

EditedField editedField(const std::string& before, const std::string& after) {
    const QJsonDocument a = QJsonDocument::fromJson(QByteArray::fromStdString(before));
    const QJsonDocument b = QJsonDocument::fromJson(QByteArray::fromStdString(after));
    QStringList places;
    bool structural = false;
    collectDifferences(a.object(), b.object(), QString(), places, structural);
    EditedField field;
    if (places.size() != 1) return field;
    field.place = places.front();
    // Non-negative, so never QUndoCommand's "does not merge" (-1).
    if (!structural) field.mergeId = static_cast<int>(qHash(field.place) & 0x3fffffffU);
    return field;
}

StudyEdit::StudyEdit(std::string before, std::string after, const QString& baseDirectory, bool mayMerge, Show show)
    : before_(std::move(before)), after_(std::move(after)), baseDirectory_(baseDirectory), show_(std::move(show)) {
    const EditedField field = editedField(before_, after_);
    if (mayMerge) mergeId_ = field.mergeId;
    setText(field.place.isEmpty() ? QObject::tr("edit of several fields") : QObject::tr("edit of %1").arg(field.place));
}

void StudyEdit::undo() {
    done_ = false;
    show_(before_, baseDirectory_);
}

void StudyEdit::redo() {
    if (done_) return;  // QUndoStack::push calls redo(); the edit is on screen already
    done_ = true;
    show_(after_, baseDirectory_);
}

bool StudyEdit::mergeWith(const QUndoCommand* other) {
    const auto* next = dynamic_cast<const StudyEdit*>(other);
    if (!next || next->mergeId_ != mergeId_ || next->baseDirectory_ != baseDirectory_) return false;
    after_ = next->after_;
    // Typed back to what it was: the step is no step (QUndoStack drops it).
    setObsolete(after_ == before_);
    return true;
}

}  // namespace sw::window
