#pragma once
// File ▸ Write report…: the review report of the window's study (core/report/report.h), as
// HTML or PDF by the file's suffix, made through the job runner so the window stays live.
//
// The report runs the study afresh, exactly as `saddlewise report` does (the study's stopping
// rules, every enabled method to the end), so its numbers are the numbers `run --json` prints
// for the same study, whatever the window is showing at that moment (a step session, a
// dragged start, a zoomed landscape). Steps:
//   1. worker: build the objective, run the lineup, compute the fit statistics, sample the
//      landscape (progress in the status bar, cancel with the window's Cancel);
//   2. GUI thread: the views draw the figures as SVG (a few hundred milliseconds; widgets
//      live on the GUI thread);
//   3. worker: assemble the HTML or lay out the PDF and write it through QSaveFile (a
//      temporary file renamed when complete, so a failure leaves no partial file).

#include "app/window/job_runner.h"
#include "core/study/study.h"

#include <QObject>
#include <QString>

namespace sw::window {

class ReportWriter : public QObject {
    Q_OBJECT
public:
    explicit ReportWriter(JobRunner* jobs, QObject* parent = nullptr);

    // Starts the report of `study` into `output` (.html, .htm or .pdf). studyPath is the
    // study's file ("" when never saved), modified whether the window has unsaved changes,
    // baseDirectory where its data file is found. Returns false with a sentence in *error
    // when the suffix is not one of those (nothing is started then).
    bool start(const study::Study& study, const QString& studyPath, const QString& baseDirectory, bool modified,
               const QString& output, QString* error = nullptr);
    bool busy() const { return busy_; }

    enum Outcome { Written = 0, Failed = 1, Cancelled = 2 };

signals:
    // How the report ended: Written (message names the file), Failed (message says why) or
    // Cancelled (with the job runner's cancel; no file was written).
    void finished(int outcome, const QString& message);

private:
    JobRunner* jobs_;
    bool busy_ = false;
};

}  // namespace sw::window
