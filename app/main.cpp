// saddlewise: no arguments or a study file opens the window; a verb runs headless.
#include "app/cli/cli.h"

#include <iostream>
#include <string>
#include <vector>

#ifdef SW_HAVE_GUI
#include "app/report/install.h"
#include "app/window/launch.h"
#endif

int main(int argc, char** argv) {
    std::vector<std::string> args(argv + 1, argv + argc);
    bool headless = !args.empty() && (sw::cli::isVerb(args[0]) || args[0].rfind("-", 0) == 0 || args[0] == "help");
#ifdef SW_HAVE_GUI
    if (headless) sw::reportgui::installReportGraphics();  // the report verb's figures and PDF
#endif
    if (headless) return sw::cli::runCommandLine(args, std::cout, std::cerr);
#ifdef SW_HAVE_GUI
    return sw::window::launch(argc, argv);
#else
    std::cerr << "saddlewise: built without the window; use a verb (saddlewise --help)\n";
    return 2;
#endif
}
