// saddlewise: no arguments or a study file opens the window; a verb runs headless; anything
// else is reported in one line (exit 2) without touching the display.
#include "app/cli/cli.h"

#include <iostream>
#include <string>
#include <vector>

#ifdef SW_HAVE_GUI
#include "app/report/install.h"
#include "app/window/launch.h"
#endif
#ifdef SW_HAVE_MPI
#include "app/mpi/mpi_process_group.h"
#endif

int main(int argc, char** argv) {
    std::vector<std::string> args(argv + 1, argv + argc);
    std::string subject;
    const sw::cli::FirstArgument kind = sw::cli::classifyFirstArgument(args, &subject);
#ifdef SW_HAVE_MPI
    // Only the survey verbs ask for a process group, and MPI starts only under a launcher.
    sw::cli::setProcessGroupFactory(&sw::mpi::joinWorld);
#endif
#ifdef SW_HAVE_GUI
    if (kind == sw::cli::FirstArgument::Headless) sw::reportgui::installReportGraphics();  // the report verb's figures and PDF
#endif
    if (kind == sw::cli::FirstArgument::Headless) return sw::cli::runCommandLine(args, std::cout, std::cerr);
    // An unknown verb or a study file that is not there: one line and exit 2, before any window.
    if (kind != sw::cli::FirstArgument::Window) return sw::cli::reportFirstArgument(kind, subject, std::cerr);
#ifdef SW_HAVE_GUI
    return sw::window::launch(argc, argv);
#else
    std::cerr << "saddlewise: built without the window; use a verb (saddlewise --help)\n";
    return 2;
#endif
}
