#include "app/window/method_names.h"

#include <map>

namespace sw::window {

QString methodDisplayName(const std::string& id) {
    static const std::map<std::string, const char*> names = {
        {"gradient-descent", "Gradient descent"},
        {"momentum", "Heavy-ball momentum"},
        {"nesterov", "Nesterov accelerated gradient"},
        {"adam", "Adam"},
        {"newton", "Newton"},
        {"damped-newton", "Damped Newton (line search)"},
        {"modified-newton", "Modified Newton (shifted Hessian)"},
        {"saddle-free-newton", "Saddle-free Newton"},
        {"trust-region-dogleg", "Trust region, dogleg"},
        {"trust-region-cg", "Trust region, Steihaug CG"},
        {"trust-region-exact", "Trust region, exact (Moré–Sorensen)"},
        {"cubic-regularization", "Cubic regularization"},
        {"sr1", "SR1 quasi-Newton"},
        {"bfgs", "BFGS"},
        {"lbfgs", "L-BFGS"},
        {"cg-fletcher-reeves", "Conjugate gradient, Fletcher–Reeves"},
        {"cg-polak-ribiere", "Conjugate gradient, Polak–Ribière"},
        {"nelder-mead", "Nelder–Mead simplex"},
        {"gauss-newton", "Gauss–Newton"},
        {"levenberg-marquardt", "Levenberg–Marquardt"},
    };
    const auto it = names.find(id);
    if (it != names.end()) return QString::fromUtf8(it->second);
    QString words = QString::fromStdString(id);
    words.replace('-', ' ');
    if (!words.isEmpty()) words[0] = words[0].toUpper();
    return words;
}

}  // namespace sw::window
