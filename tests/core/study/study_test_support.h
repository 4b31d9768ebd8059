#pragma once
// A valid formula study to start from, and a scratch folder for file tests.
#include <filesystem>
#include <fstream>
#include <random>
#include <string>

namespace sw::study::testing {

inline std::string validFormulaStudy() {
    return R"({
  "format": "saddlewise-study",
  "version": 1,
  "title": "Two-knob calibration",
  "notes": "A curved valley.",
  "objective": { "formula": "(1 - gain)^2 + 40*(offset - gain^2)^2" },
  "variables": [
    { "name": "gain", "start": -1.5, "plot_from": -2, "plot_to": 2 },
    { "name": "offset", "start": 2, "plot_from": -1, "plot_to": 3 }
  ],
  "methods": [
    { "label": "steepest", "method": "gradient-descent", "options": { "line_search": "armijo" },
      "colour": "#1B6AA5", "marker": "circle", "enabled": true },
    { "label": "quasi-newton", "method": "bfgs", "colour": "#d4731e", "marker": "square" },
    { "label": "region", "method": "trust-region-dogleg", "options": { "initial_radius": 0.5, "max_radius": 100 },
      "colour": "#2e8b57", "marker": "triangle", "enabled": false }
  ],
  "stopping": { "max_iterations": 500, "gradient_norm_below": 1e-9 },
  "view": { "plot_x": "gain", "plot_y": "offset", "log_colour": true, "contour_count": 20, "grid_cells": 150 }
}
)";
}

// A fresh empty folder under the system temp folder, removed at scope exit.
class ScratchFolder {
public:
    ScratchFolder() {
        std::random_device seed;
        path_ = std::filesystem::temp_directory_path() / ("saddlewise-study-test-" + std::to_string(seed()));
        std::filesystem::create_directories(path_);
    }
    ~ScratchFolder() {
        std::error_code ignored;
        std::filesystem::remove_all(path_, ignored);
    }
    std::string path() const { return path_.string(); }
    std::string file(const std::string& name) const { return (path_ / name).string(); }
    void write(const std::string& name, const std::string& text) const {
        std::ofstream out(path_ / name, std::ios::binary);
        out << text;
    }

private:
    std::filesystem::path path_;
};

}  // namespace sw::study::testing
