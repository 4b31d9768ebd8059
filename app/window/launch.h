#pragma once
namespace sw::window {
// Creates the QApplication and the main window (optionally opening argv[1]) and runs it.
int launch(int argc, char** argv);
}
