#include "core/objective/fit_objective.h"

#include "core/expr/expr.h"
#include "core/objective/streaming_qr.h"

#include <algorithm>
#include <atomic>
#include <charconv>
#include <chrono>
#include <cctype>
#include <cmath>
#include <condition_variable>
#include <cstring>
#include <exception>
#include <functional>
#include <mutex>
#include <thread>

namespace sw {

const char* toString(Loss loss) {
    switch (loss) {
        case Loss::LeastSquares: return "least-squares";
        case Loss::Weighted: return "weighted";
        case Loss::Huber: return "huber";
        case Loss::Cauchy: return "cauchy";
        case Loss::BernoulliLogit: return "logistic";
        case Loss::PoissonLog: return "poisson";
    }
    return "?";
}

bool parseLoss(const std::string& text, Loss& loss) {
    for (Loss l : {Loss::LeastSquares, Loss::Weighted, Loss::Huber, Loss::Cauchy, Loss::BernoulliLogit,
                   Loss::PoissonLog})
        if (text == toString(l)) {
            loss = l;
            return true;
        }
    // Former ids (docs/names.md): read, never written.
    if (text == "bernoulli-logit") return loss = Loss::BernoulliLogit, true;
    if (text == "poisson-log") return loss = Loss::PoissonLog, true;
    return false;
}

std::string lossList() { return "least-squares, weighted, huber, cauchy, logistic, poisson"; }
bool isLikelihood(Loss loss) { return loss == Loss::BernoulliLogit || loss == Loss::PoissonLog; }
bool hasResidualForm(Loss loss) { return loss == Loss::LeastSquares || loss == Loss::Weighted; }

LossTerms lossTerms(Loss loss, double y, double m, double scale) {
    LossTerms t;
    switch (loss) {
        case Loss::LeastSquares:
        case Loss::Weighted: {
            const double r = y - m;
            t.value = 0.5 * r * r;
            t.first = -r;
            t.second = 1.0;
            break;
        }
        case Loss::Huber: {
            // rho(r) = r^2/2 (|r| <= c), c|r| - c^2/2 (|r| > c); rho' = clip(r, -c, c); rho'' = 1 or 0.
            const double r = y - m;
            const double a = std::fabs(r);
            if (a <= scale) {
                t.value = 0.5 * r * r;
                t.first = -r;
                t.second = 1.0;
            } else {
                t.value = scale * (a - 0.5 * scale);
                t.first = -scale * (r > 0 ? 1.0 : -1.0);
                t.second = 0.0;
            }
            break;
        }
        case Loss::Cauchy: {
            // rho(r) = c^2/2 ln(1 + u), u = (r/c)^2; rho' = r/(1+u); rho'' = (1-u)/(1+u)^2.
            const double r = y - m;
            const double u = (r / scale) * (r / scale);
            t.value = 0.5 * scale * scale * std::log1p(u);
            t.first = -r / (1.0 + u);
            t.second = (1.0 - u) / ((1.0 + u) * (1.0 + u));
            break;
        }
        case Loss::BernoulliLogit: {
            // ln(1 + e^m) - y m, written to avoid overflow: max(m,0) + ln(1 + e^-|m|).
            const double softplus = std::max(m, 0.0) + std::log1p(std::exp(-std::fabs(m)));
            const double p = m >= 0 ? 1.0 / (1.0 + std::exp(-m)) : std::exp(m) / (1.0 + std::exp(m));
            t.value = softplus - y * m;
            t.first = p - y;
            t.second = p * (1.0 - p);
            break;
        }
        case Loss::PoissonLog: {
            const double mu = std::exp(m);
            t.value = mu - y * m + std::lgamma(y + 1.0);
            t.first = mu - y;
            t.second = mu;
            break;
        }
    }
    return t;
}

namespace {

constexpr std::size_t kBlock = 512;           // rows per program call
constexpr std::size_t kRowsPerThread = 16384;  // below this, one thread does the work
// Rows per unit of work a thread takes (16 blocks). The chunks depend on the row count alone,
// and their partial sums are added in chunk order, so results do not depend on the threads.
constexpr std::size_t kChunkRows = 8192;

bool isIdentifierStart(char c) { return std::isalpha(static_cast<unsigned char>(c)) || c == '_'; }
bool isIdentifierChar(char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; }
bool validName(const std::string& s) {
    return !s.empty() && isIdentifierStart(s[0]) && std::all_of(s.begin(), s.end(), isIdentifierChar);
}

// Names in a formula that are not function calls (a name followed by '(' is a function).
std::vector<std::string> namesIn(const std::string& text) {
    std::vector<std::string> names;
    std::size_t i = 0;
    while (i < text.size()) {
        const char c = text[i];
        if (std::isdigit(static_cast<unsigned char>(c)) || (c == '.' && i + 1 < text.size() &&
                                                             std::isdigit(static_cast<unsigned char>(text[i + 1])))) {
            // a number, possibly with an exponent: 1.5e-3
            while (i < text.size() && (std::isdigit(static_cast<unsigned char>(text[i])) || text[i] == '.')) ++i;
            if (i < text.size() && (text[i] == 'e' || text[i] == 'E')) {
                std::size_t k = i + 1;
                if (k < text.size() && (text[k] == '+' || text[k] == '-')) ++k;
                if (k < text.size() && std::isdigit(static_cast<unsigned char>(text[k]))) {
                    i = k;
                    while (i < text.size() && std::isdigit(static_cast<unsigned char>(text[i]))) ++i;
                }
            }
            continue;
        }
        if (isIdentifierStart(c)) {
            std::size_t e = i;
            while (e < text.size() && isIdentifierChar(text[e])) ++e;
            std::size_t k = e;
            while (k < text.size() && std::isspace(static_cast<unsigned char>(text[k]))) ++k;
            if (k >= text.size() || text[k] != '(') {
                std::string name = text.substr(i, e - i);
                if (std::find(names.begin(), names.end(), name) == names.end()) names.push_back(name);
            }
            i = e;
            continue;
        }
        ++i;
    }
    return names;
}

std::string joined(const std::vector<std::string>& items) {
    std::string s;
    for (const auto& item : items) s += (s.empty() ? "" : ", ") + item;
    return s;
}

std::string numberText(double v) {
    char buffer[32];
    std::snprintf(buffer, sizeof buffer, "%.6g", v);
    return buffer;
}

struct Partial {
    double value = 0;
    Vector gradient;
    Matrix hessian;
    StreamingQr factor;  // with the least-squares factor: R and Q'r of the rows seen
};

// Threads kept for the life of the objective, so a pass over the rows does not pay for
// starting threads (tens of microseconds each, on every pass of every iteration). Between
// passes a worker first watches for the next one for a few tens of microseconds (a solver's
// own work between passes is about that long) and only then sleeps; the caller likewise
// watches for the workers to finish before sleeping. One pass at a time: a second caller
// finds them busy and starts threads of its own.
class RowWorkers {
public:
    explicit RowWorkers(std::size_t extra) {
        for (std::size_t i = 1; i <= extra; ++i) threads_.emplace_back([this, i] { work(i); });
    }
    ~RowWorkers() {
        {
            std::lock_guard<std::mutex> lock(mutex_);
            stop_.store(true);
        }
        wake_.notify_all();
        for (auto& t : threads_) t.join();
    }
    RowWorkers(const RowWorkers&) = delete;
    RowWorkers& operator=(const RowWorkers&) = delete;

    std::size_t size() const { return threads_.size() + 1; }

    // Runs task(part) for every part < parts (at most size()), part 0 on the calling thread.
    // Returns false, having run nothing, when another pass is using the workers.
    bool run(std::size_t parts, const std::function<void(std::size_t)>& task) {
        std::unique_lock<std::mutex> busy(busy_, std::try_to_lock);
        if (!busy.owns_lock()) return false;
        task_ = &task;
        parts_.store(parts);
        pending_.store(parts - 1);
        {
            std::lock_guard<std::mutex> lock(mutex_);
            generation_.fetch_add(1, std::memory_order_release);
        }
        wake_.notify_all();
        std::exception_ptr failure;
        try {
            task(0);
        } catch (...) {
            failure = std::current_exception();  // the workers still use task: wait for them first
        }
        watch([this] { return pending_.load(std::memory_order_acquire) == 0; });
        if (pending_.load(std::memory_order_acquire) != 0) {
            std::unique_lock<std::mutex> lock(mutex_);
            done_.wait(lock, [this] { return pending_.load(std::memory_order_acquire) == 0; });
        }
        task_ = nullptr;
        if (failure) std::rethrow_exception(failure);
        return true;
    }

private:
    // Spins until done() or about 30 microseconds have passed (a pause instruction takes from
    // about 10 to about 140 cycles depending on the processor, so the limit is a time).
    template <class Done>
    static void watch(Done done) {
        const auto until = std::chrono::steady_clock::now() + std::chrono::microseconds(30);
        for (;;) {
            for (int i = 0; i < 16; ++i) {
                if (done()) return;
#if defined(__x86_64__) || defined(__i386__)
                __builtin_ia32_pause();
#endif
            }
            if (std::chrono::steady_clock::now() >= until) return;
        }
    }

    void work(std::size_t index) {
        unsigned long seen = 0;
        for (;;) {
            watch([&] { return generation_.load(std::memory_order_acquire) != seen || stop_.load(); });
            if (generation_.load(std::memory_order_acquire) == seen && !stop_.load()) {
                std::unique_lock<std::mutex> lock(mutex_);
                wake_.wait(lock, [&] { return stop_.load() || generation_.load(std::memory_order_acquire) != seen; });
            }
            if (stop_.load()) return;
            seen = generation_.load(std::memory_order_acquire);
            if (index >= parts_.load()) continue;  // not needed this time
            (*task_)(index);
            if (pending_.fetch_sub(1, std::memory_order_acq_rel) == 1) {
                std::lock_guard<std::mutex> lock(mutex_);
                done_.notify_one();
            }
        }
    }

    std::mutex busy_;
    std::mutex mutex_;
    std::condition_variable wake_, done_;
    const std::function<void(std::size_t)>* task_ = nullptr;
    std::atomic<std::size_t> parts_{0};  // read by workers that sit a pass out while the next is set up
    std::atomic<std::size_t> pending_{0};
    std::atomic<unsigned long> generation_{0};
    std::atomic<bool> stop_{false};
    std::vector<std::thread> threads_;
};

// The last point evaluated, with what is known there: solvers ask for the same point more than
// once (the start is checked, then evaluated; a least-squares method then asks for its factor;
// the end point's Hessian is wanted by the last record and by the classification). Values come
// from the same code as a fresh evaluation, so a hit changes no number.
struct PointCache {
    std::mutex mutex;
    Vector x;
    double value = 0;
    bool hasValue = false, hasGradient = false, hasHessian = false, hasFactor = false;
    Vector gradient;
    Matrix hessian;
    Matrix r;
    Vector qtr;
    double residualNormSq = 0;

    bool same(const Vector& at) const {
        return x.size() == at.size() && std::memcmp(x.data(), at.data(), sizeof(double) * static_cast<std::size_t>(at.size())) == 0;
    }
    // Makes the cache describe `at` (forgetting another point).
    void moveTo(const Vector& at) {
        if (same(at)) return;
        x = at;
        hasValue = hasGradient = hasHessian = hasFactor = false;
    }
};

}  // namespace

struct FitObjective::Impl {
    std::shared_ptr<const Table> table;
    FitDefinition def;
    std::vector<int> columnIndices;  // used columns, table order
    std::vector<std::string> columnNames;
    Vector y, w, sqrtW;
    bool hasWeights = false;
    expr::Expression modelExpression;
    std::vector<expr::Expression> modelGradient;
    expr::Program valueProgram, gradientProgram, hessianProgram;
    std::vector<char> modelHessianZero;  // per upper-triangle entry: identically zero
    int p = 0;
    std::size_t rows = 0;
    unsigned threads = 1;
    mutable std::once_flag workersMade;
    mutable std::unique_ptr<RowWorkers> workers;
    mutable PointCache cache;

    std::size_t chunkCount() const { return std::max<std::size_t>(1, (rows + kChunkRows - 1) / kChunkRows); }

    // Runs fn(begin, end, chunk) for every chunk of kChunkRows rows, on up to partsFor()
    // threads. Each thread takes the next chunk when it is done with one, so a thread the
    // system pauses (a busy machine) holds the pass up by one chunk at most.
    template <class Fn>
    void forRowChunks(Fn&& fn) const {
        const std::size_t chunks = chunkCount();
        const auto range = [&](std::size_t c) { fn(c * kChunkRows, std::min(rows, (c + 1) * kChunkRows), c); };
        const std::size_t parts = std::min(partsFor(), chunks);
        if (parts <= 1) {
            for (std::size_t c = 0; c < chunks; ++c) range(c);
            return;
        }
        std::atomic<std::size_t> next{0};
        const std::function<void(std::size_t)> drain = [&](std::size_t) {
            for (std::size_t c = next.fetch_add(1); c < chunks; c = next.fetch_add(1)) range(c);
        };
        std::call_once(workersMade, [this] { workers = std::make_unique<RowWorkers>(threads - 1); });
        if (parts <= workers->size() && workers->run(parts, drain)) return;
        std::vector<std::thread> pool;
        for (std::size_t t = 1; t < parts; ++t) pool.emplace_back([&drain, t] { drain(t); });
        drain(0);
        for (auto& th : pool) th.join();
    }

    std::size_t partsFor() const {
        const std::size_t byRows = std::max<std::size_t>(1, rows / kRowsPerThread);
        return std::min<std::size_t>(threads, byRows);
    }

    // Inputs of the programs for rows starting at `row`: parameters broadcast, columns as arrays.
    void bindInputs(const Vector& x, std::size_t row, std::vector<expr::Program::BlockInput>& inputs) const {
        inputs.resize(static_cast<std::size_t>(p) + columnIndices.size());
        for (int j = 0; j < p; ++j) inputs[static_cast<std::size_t>(j)] = {x.data() + j, 0};
        for (std::size_t k = 0; k < columnIndices.size(); ++k)
            inputs[static_cast<std::size_t>(p) + k] = {
                table->columns[static_cast<std::size_t>(columnIndices[k])].data() + row, 1};
    }

    // Sum over rows of w * loss and, for order >= 1, its gradient, for order 2 its Hessian.
    // With `factor` (order 1, residual form only) the rows are also folded into the streaming
    // QR of [dm r] with r_i = sqrt(w_i) (y_i - m_i) and dm the weighted model derivatives, which is
    // -J: its R is -R of J and its Q'r that of J.
    Partial accumulate(const Vector& x, int order, bool factor = false) const {
        const expr::Program& program = order == 0 ? valueProgram : order == 1 ? gradientProgram : hessianProgram;
        const std::size_t parts = chunkCount();
        std::vector<Partial> partials(parts);
        const int outputs = program.outputCount();
        forRowChunks([&](std::size_t begin, std::size_t end, std::size_t part) {
            Partial& acc = partials[part];
            if (order >= 1) acc.gradient = Vector::Zero(p);
            if (order >= 2) acc.hessian = Matrix::Zero(p, p);
            if (factor) acc.factor = StreamingQr(p);
            expr::Program::Workspace workspace = program.makeWorkspace();
            std::vector<double> buffer(static_cast<std::size_t>(outputs) * kBlock);
            std::vector<double*> outs(static_cast<std::size_t>(outputs));
            std::vector<expr::Program::BlockInput> inputs;
            Vector first(static_cast<Eigen::Index>(kBlock)), second(static_cast<Eigen::Index>(kBlock));
            std::vector<double> residualBlock(hasResidualForm(def.loss) ? kBlock : 0);
            Vector weighted(order >= 2 ? static_cast<Eigen::Index>(kBlock) : 0);
            std::vector<double> sums(static_cast<std::size_t>(p * (p + 1) / 2 + 1));
            // Hessian entries (a, b) whose model second derivative is not identically zero, and
            // where the program writes them.
            std::vector<const double*> curvatureColumns;
            std::vector<std::pair<int, int>> curvatureEntries;
            if (order >= 2) {
                std::size_t k = 0;
                for (int a = 0; a < p; ++a)
                    for (int b = a; b < p; ++b, ++k)
                        if (!modelHessianZero[k]) {
                            curvatureColumns.push_back(buffer.data() + (static_cast<std::size_t>(1 + p) + k) * kBlock);
                            curvatureEntries.emplace_back(a, b);
                        }
            }
            std::vector<double*> factorColumns(factor ? static_cast<std::size_t>(p) + 1 : 0);
            for (std::size_t row = begin; row < end; row += kBlock) {
                const std::size_t count = std::min(kBlock, end - row);
                for (int o = 0; o < outputs; ++o) outs[static_cast<std::size_t>(o)] = buffer.data() + o * kBlock;
                bindInputs(x, row, inputs);
                program.evaluateBlock(inputs.data(), count, outs.data(), workspace);
                const double* m = outs[0];
                if (hasResidualForm(def.loss)) {
                    // The same terms as lossTerms() for (weighted) least squares, as whole-block
                    // array operations (vectorised): r = y - m, 1/2 w r^2, -w r, w; and for the
                    // factor the residuals sqrt(w) r.
                    const auto n = static_cast<Eigen::Index>(count);
                    const auto at = static_cast<Eigen::Index>(row);
                    Eigen::Map<const Eigen::ArrayXd> mb(m, n);
                    Eigen::Map<Eigen::ArrayXd> rb(residualBlock.data(), n);
                    rb = y.array().segment(at, n) - mb;
                    if (hasWeights) {
                        const auto wb = w.array().segment(at, n);
                        acc.value += 0.5 * (wb * rb.square()).sum();
                        first.head(n).array() = -(wb * rb);
                        if (order >= 2) second.head(n) = w.segment(at, n);
                        if (factor) rb *= sqrtW.array().segment(at, n);
                    } else {
                        acc.value += 0.5 * rb.square().sum();
                        first.head(n).array() = -rb;
                        if (order >= 2) second.head(n).setOnes();
                    }
                } else {
                    for (std::size_t i = 0; i < count; ++i) {
                        const std::size_t r = row + i;
                        const LossTerms t = lossTerms(def.loss, y[static_cast<Eigen::Index>(r)], m[i], def.scale);
                        const double wi = w[static_cast<Eigen::Index>(r)];
                        acc.value += wi * t.value;
                        first[static_cast<Eigen::Index>(i)] = wi * t.first;
                        second[static_cast<Eigen::Index>(i)] = wi * t.second;
                    }
                }
                if (order == 0) continue;
                const auto n = static_cast<Eigen::Index>(count);
                Eigen::Map<const Matrix, 0, Eigen::OuterStride<>> dm(outs[1], n, p,
                                                                     Eigen::OuterStride<>(static_cast<Eigen::Index>(kBlock)));
                // Sums over the block's rows by the 4-wide dot products of streaming_qr.h.
                const double* const* dmColumns = outs.data() + 1;
                dotProducts(first.data(), dmColumns, p, count, sums.data());
                for (int j = 0; j < p; ++j) acc.gradient[j] += sums[static_cast<std::size_t>(j)];
                if (factor) {
                    // The block's rows of [-J r], folded into R and Q'r (the buffers are scratch now).
                    for (int j = 0; j < p; ++j) {
                        double* column = outs[static_cast<std::size_t>(1 + j)];
                        if (hasWeights)
                            for (std::size_t i = 0; i < count; ++i) column[i] *= sqrtW[static_cast<Eigen::Index>(row + i)];
                        factorColumns[static_cast<std::size_t>(j)] = column;
                    }
                    factorColumns[static_cast<std::size_t>(p)] = residualBlock.data();
                    acc.factor.addRows(factorColumns.data(), count);
                }
                if (order == 1) continue;
                // dm' diag(second) dm, one dot product per upper-triangle entry (for a few
                // parameters and a block of rows cheaper than a general matrix product).
                const bool unitCurvature = hasResidualForm(def.loss) && !hasWeights;  // second = 1
                for (int a = 0; a < p; ++a) {
                    if (!unitCurvature) weighted.head(n) = second.head(n).cwiseProduct(dm.col(a));
                    const double* left = unitCurvature ? outs[static_cast<std::size_t>(1 + a)] : weighted.data();
                    dotProducts(left, dmColumns + a, p - a, count, sums.data());
                    for (int b = a; b < p; ++b) {
                        const double term = sums[static_cast<std::size_t>(b - a)];
                        acc.hessian(a, b) += term;
                        if (b != a) acc.hessian(b, a) += term;
                    }
                }
                // sum first * d2m over the entries that are not identically zero (e.g. d2m/da^2
                // of a model linear in a).
                dotProducts(first.data(), curvatureColumns.data(), static_cast<int>(curvatureColumns.size()), count,
                            sums.data());
                for (std::size_t c = 0; c < curvatureColumns.size(); ++c) {
                    const auto [a, b] = curvatureEntries[c];
                    acc.hessian(a, b) += sums[c];
                    if (b != a) acc.hessian(b, a) += sums[c];
                }
            }
        });
        Partial total = std::move(partials[0]);
        for (std::size_t t = 1; t < parts; ++t) {
            total.value += partials[t].value;
            if (order >= 1) total.gradient += partials[t].gradient;
            if (order >= 2) total.hessian += partials[t].hessian;
            if (factor) total.factor.merge(partials[t].factor);
        }
        return total;
    }

    // accumulate() through the point cache: a repeated point costs nothing.
    Partial cached(const Vector& x, int order) const {
        {
            std::lock_guard<std::mutex> lock(cache.mutex);
            if (cache.same(x) && cache.hasValue && (order < 1 || cache.hasGradient) && (order < 2 || cache.hasHessian)) {
                Partial hit;
                hit.value = cache.value;
                if (order >= 1) hit.gradient = cache.gradient;
                if (order >= 2) hit.hessian = cache.hessian;
                return hit;
            }
        }
        Partial fresh = accumulate(x, order);
        std::lock_guard<std::mutex> lock(cache.mutex);
        cache.moveTo(x);
        cache.value = fresh.value;
        cache.hasValue = true;
        if (order >= 1) {
            cache.gradient = fresh.gradient;
            cache.hasGradient = true;
        }
        if (order >= 2) {
            cache.hessian = fresh.hessian;
            cache.hasHessian = true;
        }
        return fresh;
    }

    // Model values (and derivatives, column-major rows x p) written straight into the outputs.
    void modelInto(const Vector& x, double* values, double* derivatives, Eigen::Index ld) const {
        const expr::Program& program = derivatives ? gradientProgram : valueProgram;
        forRowChunks([&](std::size_t begin, std::size_t end, std::size_t) {
            expr::Program::Workspace workspace = program.makeWorkspace();
            std::vector<double*> outs(static_cast<std::size_t>(program.outputCount()));
            std::vector<expr::Program::BlockInput> inputs;
            for (std::size_t row = begin; row < end; row += kBlock) {
                const std::size_t count = std::min(kBlock, end - row);
                outs[0] = values + row;
                if (derivatives)
                    for (int j = 0; j < p; ++j)
                        outs[static_cast<std::size_t>(1 + j)] = derivatives + static_cast<std::size_t>(j) * ld + row;
                bindInputs(x, row, inputs);
                program.evaluateBlock(inputs.data(), count, outs.data(), workspace);
            }
        });
    }
};

FitObjective::FitObjective(std::shared_ptr<const Table> table, FitDefinition definition)
    : impl_(std::make_unique<Impl>()) {
    Impl& d = *impl_;
    if (!table || table->rowCount() == 0) throw FitError("the data table is empty");
    d.table = std::move(table);
    d.def = std::move(definition);
    const Table& t = *d.table;
    const FitDefinition& def = d.def;
    auto lineOf = [&t](std::size_t row) {
        return row < t.rowLines.size() ? "line " + std::to_string(t.rowLines[row]) : "row " + std::to_string(row + 1);
    };

    if (def.parameters.empty()) throw FitError("no parameters: give at least one parameter with a start value");
    for (std::size_t j = 0; j < def.parameters.size(); ++j) {
        const std::string& name = def.parameters[j];
        if (!validName(name))
            throw FitError("parameter '" + name + "' is not a valid name (letters, digits, _; not starting with a digit)");
        for (std::size_t k = 0; k < j; ++k)
            if (def.parameters[k] == name) throw FitError("parameter '" + name + "' is given twice");
        if (t.columnIndex(name) >= 0)
            throw FitError("parameter '" + name + "' is also a column name of the table; rename one of them");
    }
    d.p = static_cast<int>(def.parameters.size());

    const int responseIndex = t.columnIndex(def.response);
    if (def.response.empty()) throw FitError("no response column given; columns: " + t.columnList());
    if (responseIndex < 0)
        throw FitError("response column '" + def.response + "' is not in the table; columns: " + t.columnList());
    if (!(def.scale > 0) || !std::isfinite(def.scale))
        throw FitError("scale must be a finite number > 0 (got " + numberText(def.scale) + ")");

    d.rows = t.rowCount();
    const auto rows = static_cast<Eigen::Index>(d.rows);
    d.y = Eigen::Map<const Vector>(t.columns[static_cast<std::size_t>(responseIndex)].data(), rows);
    d.w = Vector::Ones(rows);
    if (!def.weights.empty() && !def.sigma.empty())
        throw FitError("give either a weights column or a sigma column, not both");
    if (def.loss == Loss::Weighted && def.weights.empty() && def.sigma.empty())
        throw FitError("the weighted loss needs a weights column or a sigma (standard deviation) column");
    if (!def.weights.empty()) {
        const int wi = t.columnIndex(def.weights);
        if (wi < 0) throw FitError("weights column '" + def.weights + "' is not in the table; columns: " + t.columnList());
        const auto& col = t.columns[static_cast<std::size_t>(wi)];
        for (std::size_t i = 0; i < d.rows; ++i) {
            if (!(col[i] >= 0))
                throw FitError("weights column '" + def.weights + "', " + lineOf(i) + ": a weight must be >= 0 (got " +
                               numberText(col[i]) + ")");
            d.w[static_cast<Eigen::Index>(i)] = col[i];
        }
        d.hasWeights = true;
    }
    if (!def.sigma.empty()) {
        const int si = t.columnIndex(def.sigma);
        if (si < 0) throw FitError("sigma column '" + def.sigma + "' is not in the table; columns: " + t.columnList());
        const auto& col = t.columns[static_cast<std::size_t>(si)];
        for (std::size_t i = 0; i < d.rows; ++i) {
            if (!(col[i] > 0))
                throw FitError("sigma column '" + def.sigma + "', " + lineOf(i) +
                               ": a standard deviation must be > 0 (got " + numberText(col[i]) + ")");
            d.w[static_cast<Eigen::Index>(i)] = 1.0 / (col[i] * col[i]);
        }
        d.hasWeights = true;
    }
    d.sqrtW = d.w.cwiseSqrt();
    for (std::size_t i = 0; i < d.rows; ++i) {
        const double yi = d.y[static_cast<Eigen::Index>(i)];
        if (def.loss == Loss::BernoulliLogit && !(yi >= 0 && yi <= 1))
            throw FitError("response column '" + def.response + "', " + lineOf(i) +
                           ": the logistic loss needs responses in [0, 1] (got " + numberText(yi) + ")");
        if (def.loss == Loss::PoissonLog && !(yi >= 0))
            throw FitError("response column '" + def.response + "', " + lineOf(i) +
                           ": the poisson loss needs counts >= 0 (got " + numberText(yi) + ")");
    }

    // The model's own mistakes first (a function name used as a value, a missing operand, ...),
    // with the formula messages and their caret; an unknown name is explained below, with the
    // parameters and columns it could have been.
    {
        std::vector<std::string> everything = def.parameters;
        everything.insert(everything.end(), t.columnNames.begin(), t.columnNames.end());
        try {
            (void)expr::Expression::parse(def.model, everything);
        } catch (const expr::FormulaError& e) {
            if (e.unknownNames().empty()) throw;
        }
    }
    // Every name in the model must be a parameter or a column.
    std::vector<std::string> parameterSet = def.parameters;
    for (const std::string& name : namesIn(def.model)) {
        if (std::find(parameterSet.begin(), parameterSet.end(), name) != parameterSet.end()) continue;
        const int c = t.columnIndex(name);
        if (c >= 0) {
            if (c == responseIndex)
                throw FitError("the model uses the response column '" + name +
                               "'; a model predicts the response from other columns");
            continue;
        }
        if (name == "pi" || name == "e") continue;
        throw FitError("the model uses '" + name + "', which is neither a parameter (" + joined(def.parameters) +
                       ") nor a column of the table (" + t.columnList() + ")");
    }
    const std::vector<std::string> used = namesIn(def.model);
    for (int c = 0; c < t.columnCount(); ++c)
        if (std::find(used.begin(), used.end(), t.columnNames[static_cast<std::size_t>(c)]) != used.end()) {
            d.columnIndices.push_back(c);
            d.columnNames.push_back(t.columnNames[static_cast<std::size_t>(c)]);
        }
    std::vector<std::string> symbols = def.parameters;
    symbols.insert(symbols.end(), d.columnNames.begin(), d.columnNames.end());
    d.modelExpression = expr::Expression::parse(def.model, symbols);
    const std::vector<std::string> usedSymbols = d.modelExpression.usedSymbols();
    for (const std::string& name : def.parameters)
        if (std::find(usedSymbols.begin(), usedSymbols.end(), name) == usedSymbols.end())
            throw FitError("parameter '" + name + "' does not appear in the model, so the data cannot determine it");

    std::vector<int> wrt(static_cast<std::size_t>(d.p));
    for (int j = 0; j < d.p; ++j) wrt[static_cast<std::size_t>(j)] = j;
    d.modelGradient = expr::gradient(d.modelExpression, wrt);
    const std::vector<expr::Expression> hessian = expr::hessianUpper(d.modelExpression, wrt);
    for (const expr::Expression& h : hessian)
        d.modelHessianZero.push_back(h.isConstant() && h.evaluate(std::vector<double>(symbols.size(), 0.0)) == 0.0);
    std::vector<expr::Expression> outputs = {d.modelExpression};
    d.valueProgram = expr::Program::compile(outputs);
    outputs.insert(outputs.end(), d.modelGradient.begin(), d.modelGradient.end());
    d.gradientProgram = expr::Program::compile(outputs);
    outputs.insert(outputs.end(), hessian.begin(), hessian.end());
    d.hessianProgram = expr::Program::compile(outputs);

    d.threads = def.threads > 0 ? static_cast<unsigned>(def.threads) : std::max(1u, std::thread::hardware_concurrency());
}

FitObjective::~FitObjective() = default;

int FitObjective::dimension() const { return impl_->p; }
std::vector<std::string> FitObjective::variableNames() const { return impl_->def.parameters; }

std::string FitObjective::description() const {
    const FitDefinition& d = impl_->def;
    return std::string(toString(d.loss)) + " fit: " + modelEquation(d) + " (" + std::to_string(impl_->rows) + " rows)";
}

double FitObjective::value(const Vector& x) const { return impl_->cached(x, 0).value; }

double FitObjective::valueGradient(const Vector& x, Vector& gradient) const {
    Partial p = impl_->cached(x, 1);
    gradient = std::move(p.gradient);
    return p.value;
}

double FitObjective::valueGradientHessian(const Vector& x, Vector& gradient, Matrix& hessian) const {
    Partial p = impl_->cached(x, 2);
    gradient = std::move(p.gradient);
    hessian = std::move(p.hessian);
    return p.value;
}

bool FitObjective::hasResiduals() const { return hasResidualForm(impl_->def.loss); }
int FitObjective::residualCount() const { return hasResiduals() ? static_cast<int>(impl_->rows) : 0; }

void FitObjective::residuals(const Vector& x, Vector& r, Matrix* jacobian) const {
    const Impl& d = *impl_;
    const auto rows = static_cast<Eigen::Index>(d.rows);
    if (!hasResiduals()) {
        r.resize(0);
        if (jacobian) jacobian->resize(0, d.p);
        return;
    }
    r.resize(rows);
    if (jacobian) jacobian->resize(rows, d.p);
    d.modelInto(x, r.data(), jacobian ? jacobian->data() : nullptr, rows);
    // r_i = sqrt(w_i) (y_i - m_i), J_ij = -sqrt(w_i) dm_i/dtheta_j
    if (d.hasWeights) {
        r = d.sqrtW.cwiseProduct(d.y - r);
        if (jacobian) jacobian->array().colwise() *= -d.sqrtW.array();
    } else {
        r = d.y - r;
        if (jacobian) *jacobian *= -1.0;
    }
}

bool FitObjective::leastSquaresFactor(const Vector& x, Matrix& r, Vector& qtr, double& residualNormSq) const {
    const Impl& d = *impl_;
    if (!hasResiduals() || d.rows < static_cast<std::size_t>(d.p)) return false;
    {
        std::lock_guard<std::mutex> lock(d.cache.mutex);
        if (d.cache.same(x) && d.cache.hasFactor) {
            r = d.cache.r;
            qtr = d.cache.qtr;
            residualNormSq = d.cache.residualNormSq;
            return true;
        }
    }
    // One pass: value and gradient (as valueGradient computes them, so they are cached too)
    // and the rows folded into R and Q'r.
    Partial fresh = d.accumulate(x, 1, true);
    r = -fresh.factor.r();  // the fold saw dm = -J
    qtr = fresh.factor.qtr();
    residualNormSq = fresh.factor.residualNormSq();
    std::lock_guard<std::mutex> lock(d.cache.mutex);
    d.cache.moveTo(x);
    d.cache.value = fresh.value;
    d.cache.gradient = std::move(fresh.gradient);
    d.cache.hasValue = d.cache.hasGradient = true;
    d.cache.r = r;
    d.cache.qtr = qtr;
    d.cache.residualNormSq = residualNormSq;
    d.cache.hasFactor = true;
    return true;
}

const FitDefinition& FitObjective::definition() const { return impl_->def; }
const Table& FitObjective::table() const { return *impl_->table; }
int FitObjective::rowCount() const { return static_cast<int>(impl_->rows); }
const Vector& FitObjective::response() const { return impl_->y; }
const Vector& FitObjective::weights() const { return impl_->w; }

void FitObjective::model(const Vector& x, Vector& values, Matrix* derivatives) const {
    const auto rows = static_cast<Eigen::Index>(impl_->rows);
    values.resize(rows);
    if (derivatives) derivatives->resize(rows, impl_->p);
    impl_->modelInto(x, values.data(), derivatives ? derivatives->data() : nullptr, rows);
}

std::vector<std::string> FitObjective::modelDerivativeText() const {
    std::vector<std::string> text;
    for (const auto& g : impl_->modelGradient) text.push_back(g.toText());
    return text;
}

std::vector<std::string> FitObjective::usedColumns() const { return impl_->columnNames; }


// ---------------------------------------------------------------- the model in words

namespace {

std::string shortText(double v) {
    char buffer[32];
    auto [ptr, ec] = std::to_chars(buffer, buffer + sizeof buffer, v, std::chars_format::general, 6);
    return ec == std::errc() ? std::string(buffer, ptr) : std::string("?");
}

std::string weightsText(const FitDefinition& d) {
    if (!d.weights.empty()) return ", rows weighted by column '" + d.weights + "'";
    if (!d.sigma.empty()) return ", rows weighted by 1/sd^2 with sd from column '" + d.sigma + "'";
    return "";
}

}  // namespace

std::string modelEquation(const FitDefinition& d) {
    switch (d.loss) {
        case Loss::BernoulliLogit:
            return "log(p / (1 - p)) = " + d.model + ", where p = P(" + d.response + " = 1)";
        case Loss::PoissonLog: return "log(mean of " + d.response + ") = " + d.model;
        default: return d.response + " = " + d.model + " + error";
    }
}

std::string lossInWords(const FitDefinition& d) {
    const std::string r = "(" + d.response + " - model)";
    switch (d.loss) {
        case Loss::LeastSquares: return "least squares: 1/2 sum " + r + "^2" + weightsText(d);
        case Loss::Weighted: return "weighted least squares: 1/2 sum w " + r + "^2" + weightsText(d);
        case Loss::Huber:
            return "Huber with scale " + shortText(d.scale) + ": squares the residual up to the scale, grows linearly beyond" +
                   weightsText(d);
        case Loss::Cauchy:
            return "Cauchy with scale " + shortText(d.scale) + ": (scale^2/2) log(1 + (residual/scale)^2)" + weightsText(d);
        case Loss::BernoulliLogit: return "logistic: the negative log-likelihood of 0/1 outcomes" + weightsText(d);
        case Loss::PoissonLog: return "poisson: the negative log-likelihood of counts" + weightsText(d);
    }
    return toString(d.loss);
}


}  // namespace sw
