#include "core/objective/streaming_qr.h"

#include "core/objective/streaming_qr_kernel.h"

#include <cstdlib>
#include <vector>

namespace sw {

namespace streaming_qr {

namespace {

// Four independent partial sums, so the loop is not one long chain of dependent additions.
double plainSumSquares(const double* a, std::size_t m) {
    double s0 = 0, s1 = 0, s2 = 0, s3 = 0;
    std::size_t i = 0;
    for (; i + 4 <= m; i += 4) {
        s0 += a[i] * a[i];
        s1 += a[i + 1] * a[i + 1];
        s2 += a[i + 2] * a[i + 2];
        s3 += a[i + 3] * a[i + 3];
    }
    for (; i < m; ++i) s0 += a[i] * a[i];
    return (s0 + s1) + (s2 + s3);
}

void plainDots(const double* a, const double* const* b, int count, std::size_t m, double* out) {
    for (int c = 0; c < count; ++c) {
        const double* bc = b[c];
        double s0 = 0, s1 = 0, s2 = 0, s3 = 0;
        std::size_t i = 0;
        for (; i + 4 <= m; i += 4) {
            s0 += a[i] * bc[i];
            s1 += a[i + 1] * bc[i + 1];
            s2 += a[i + 2] * bc[i + 2];
            s3 += a[i + 3] * bc[i + 3];
        }
        for (; i < m; ++i) s0 += a[i] * bc[i];
        out[c] = (s0 + s1) + (s2 + s3);
    }
}

void plainAxpys(const double* x, double* const* y, const double* alpha, int count, std::size_t m) {
    for (int c = 0; c < count; ++c) {
        double* yc = y[c];
        const double ac = alpha[c];
        for (std::size_t i = 0; i < m; ++i) yc[i] += ac * x[i];
    }
}

void plainAxpysThenDots(const double* x, double* const* y, const double* alpha, int count, std::size_t m,
                        double* sums) {
    plainAxpys(x, y, alpha, count, m);
    sums[0] = plainSumSquares(y[0], m);
    if (count > 1) plainDots(y[0], y + 1, count - 1, m, sums + 1);
}

}  // namespace

const Kernel& plainKernel() {
    static const Kernel kernel{plainSumSquares, plainDots, plainAxpys, plainAxpysThenDots};
    return kernel;
}

}  // namespace streaming_qr

namespace {

const streaming_qr::Kernel& kernel() {
    static const streaming_qr::Kernel* chosen = [] {
        if (std::getenv("SADDLEWISE_SCALAR_MATH")) return &streaming_qr::plainKernel();
        const streaming_qr::Kernel* fast = streaming_qr::avx2Kernel();
        return fast ? fast : &streaming_qr::plainKernel();
    }();
    return *chosen;
}

}  // namespace

bool StreamingQr::vectorised() { return &kernel() != &streaming_qr::plainKernel(); }

void dotProducts(const double* a, const double* const* b, int count, std::size_t m, double* out) {
    for (int c = 0; c < count; c += streaming_qr::kGroup)
        kernel().dots(a, b + c, std::min(streaming_qr::kGroup, count - c), m, out + c);
}

StreamingQr::StreamingQr(int columns) : n_(columns), t_(Eigen::MatrixXd::Zero(columns, columns + 1)) {}

void StreamingQr::reset() {
    rows_ = 0;
    residualNormSq_ = 0;
    t_.setZero();
}

void StreamingQr::fold(double* const* columns, std::size_t count) {
    if (count == 0) return;
    streaming_qr::foldRows(kernel(), t_.data(), n_, columns, count);
}

void StreamingQr::addRows(double* const* columns, std::size_t count) {
    if (count == 0) return;
    residualNormSq_ += kernel().sumSquares(columns[n_], count);
    rows_ += static_cast<long>(count);
    fold(columns, count);
}

void StreamingQr::merge(const StreamingQr& other) {
    rows_ += other.rows_;
    residualNormSq_ += other.residualNormSq_;
    if (n_ == 0) return;
    Eigen::MatrixXd stacked = other.t_;  // its n rows, scratch
    std::vector<double*> columns(static_cast<std::size_t>(n_) + 1);
    for (int j = 0; j <= n_; ++j) columns[static_cast<std::size_t>(j)] = stacked.col(j).data();
    fold(columns.data(), static_cast<std::size_t>(n_));
}

Eigen::MatrixXd StreamingQr::r() const { return t_.leftCols(n_).triangularView<Eigen::Upper>(); }

Eigen::VectorXd StreamingQr::qtr() const { return t_.col(n_); }

}  // namespace sw
