// Low-discrepancy starts: the Halton sequence with RR2-permuted digits.
#include "core/survey/survey.h"

#include <gtest/gtest.h>

#include <set>

namespace {

using namespace sw::survey;

TEST(Halton, ReverseRadixPermutationFollowsItsDefinition) {
    // Vandewoestyne & Cools (2006): bit-reverse 0..2^k-1 in k bits, keep those below the base
    // (worked out by hand from that definition).
    EXPECT_EQ(reverseRadixPermutation(2), (std::vector<int>{0, 1}));
    EXPECT_EQ(reverseRadixPermutation(3), (std::vector<int>{0, 2, 1}));
    EXPECT_EQ(reverseRadixPermutation(5), (std::vector<int>{0, 4, 2, 1, 3}));
    for (int base : {7, 11, 13, 29, 31, 311}) {
        const std::vector<int> p = reverseRadixPermutation(base);
        ASSERT_EQ(static_cast<int>(p.size()), base);
        EXPECT_EQ(p[0], 0) << "a zero digit stays zero, so trailing zeros add nothing";
        EXPECT_EQ(std::set<int>(p.begin(), p.end()).size(), static_cast<std::size_t>(base));
    }
}

TEST(Halton, FirstDimensionIsTheVanDerCorputSequence) {
    // Base 2 with the identity permutation: 1/2, 1/4, 3/4, 1/8, ... (van der Corput 1935).
    const double expected[] = {0.5, 0.25, 0.75, 0.125, 0.625, 0.375, 0.875};
    for (int k = 1; k <= 7; ++k) EXPECT_EQ(haltonPoint(k, 1)[0], expected[k - 1]);
    // Base 3 permuted {0, 2, 1}: index 1 -> digit 2 -> 2/3; index 2 -> digit 1 -> 1/3.
    EXPECT_DOUBLE_EQ(haltonPoint(1, 2)[1], 2.0 / 3);
    EXPECT_DOUBLE_EQ(haltonPoint(2, 2)[1], 1.0 / 3);
}

TEST(Halton, PointsFillEveryStripOfTheUnitCube) {
    // 243 = 3^5 consecutive points of a base-3 coordinate put exactly one point in each strip of
    // width 1/243 (a digit permutation keeps that property): the stratification that makes the
    // sequence low-discrepancy. Checked for dimension 2 (base 3) of an 11-dimensional sequence.
    std::vector<int> strips(243, 0);
    for (long k = 243; k < 486; ++k) {
        const std::vector<double> u = haltonPoint(k, 11);
        for (double c : u) {
            ASSERT_GE(c, 0.0);
            ASSERT_LT(c, 1.0);
        }
        ++strips[static_cast<std::size_t>(u[1] * 243)];
    }
    for (int count : strips) EXPECT_EQ(count, 1);
}

TEST(Halton, RefusesWhatItCannotDo) {
    EXPECT_THROW(haltonPoint(0, 2), std::invalid_argument);
    EXPECT_THROW(haltonPoint(1, 65), std::invalid_argument);
    EXPECT_THROW(reverseRadixPermutation(1), std::invalid_argument);
}

}  // namespace
