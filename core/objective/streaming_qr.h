#pragma once
// Householder QR of a tall matrix fed a block of rows at a time (a streaming tall-skinny QR):
// for J (m x n, m >> n) and a vector r, keeps only the n x n upper-triangular R and the n
// entries Q'r of J = Q R, plus |r|^2 and the row count. Each block [R Q'r; J_b r_b] is reduced
// back to n rows by n Householder reflections (Golub & Van Loan, "Matrix Computations", 4th ed.,
// Sec. 5.1-5.2), so J never has to be kept whole and J'J is never formed (its condition number
// is the square of J's). Accumulators of disjoint row ranges are merged by reducing the stacked
// triangles the same way (the tall-skinny QR of Demmel, Grigori, Hoemmen & Langou, SIAM J. Sci.
// Comput. 34 (2012)). R is unique up to the signs of its rows; R'R = J'J and R'(Q'r) = J'r.
//
// With AVX2 and FMA (checked at run time) the row loops use 4-wide vector code.
#include <Eigen/Dense>

#include <cstddef>

namespace sw {

class StreamingQr {
public:
    explicit StreamingQr(int columns = 0);
    // Back to no rows (keeps the column count).
    void reset();
    int columns() const { return n_; }
    long rows() const { return rows_; }

    // Folds `count` rows in. columns[0..n-1] point to the rows of J's columns, columns[n] to
    // the residuals; all of them are overwritten (used as scratch).
    void addRows(double* const* columns, std::size_t count);
    // Folds in the rows another accumulator has seen (same column count).
    void merge(const StreamingQr& other);

    // R (n x n, upper triangular; rows x columns of J so far need not exceed n: with fewer
    // rows than columns the lower rows of R are zero).
    Eigen::MatrixXd r() const;
    // The first n entries of Q'r.
    Eigen::VectorXd qtr() const;
    // |r|^2, summed directly over the residuals.
    double residualNormSq() const { return residualNormSq_; }

    // True when the 4-wide kernel is in use (AVX2 + FMA; SADDLEWISE_SCALAR_MATH turns it off).
    static bool vectorised();

private:
    void fold(double* const* columns, std::size_t count);
    int n_ = 0;
    long rows_ = 0;
    double residualNormSq_ = 0;
    Eigen::MatrixXd t_;  // n x (n + 1): [R  Q'r]
};

// out[c] = a'b[c] over m entries for c < count, with the same row kernels (4-wide with AVX2).
void dotProducts(const double* a, const double* const* b, int count, std::size_t m, double* out);

}  // namespace sw
