#pragma once
// Undo for the study as the document. The document is the whole study as the editors show it,
// as the study writer's text (core/study toJson, fields that do not parse yet included): every
// user edit pushes one StudyEdit holding the text before and after it, and undo or redo shows
// the other text again through the same path as opening a study. Whole texts rather than
// per-editor commands, because every editor (objective, lineup, landscape, preferences, surveys)
// then shares one exact and simple way back, and a study's text is small.
//
// A run of edits to one field (keystrokes in the formula, in one start) is one step: such edits
// carry an id for the field and merge. Edits of several fields at once, and structural ones
// (a variable or a method added, a flag switched), never merge.

#include <QString>
#include <QUndoCommand>
#include <functional>
#include <string>

namespace sw::window {

// The field an edit changed, found by comparing the two study texts: `place` names it
// ("objective.formula", "variables[1].start", "methods[2].options.eta"; empty when several
// fields changed) and `mergeId` is its id for QUndoCommand::mergeWith, or -1 when the edit must
// stay a step of its own (several fields, or anything but a text or a number typed in place).
struct EditedField {
    QString place;
    int mergeId = -1;
};
EditedField editedField(const std::string& before, const std::string& after);

class StudyEdit : public QUndoCommand {
public:
    // show: puts a study text on screen (without recording an edit). baseDirectory: the folder
    // the texts' data path was relative to when they were recorded.
    using Show = std::function<void(const std::string& text, const QString& baseDirectory)>;
    StudyEdit(std::string before, std::string after, const QString& baseDirectory, bool mayMerge, Show show);

    void undo() override;
    void redo() override;
    int id() const override { return mergeId_; }
    bool mergeWith(const QUndoCommand* other) override;

    const std::string& before() const { return before_; }
    const std::string& after() const { return after_; }

private:
    std::string before_;
    std::string after_;
    QString baseDirectory_;
    int mergeId_ = -1;
    bool done_ = true;  // pushed after the edit is already on screen: the first redo shows nothing
    Show show_;
};

}  // namespace sw::window
