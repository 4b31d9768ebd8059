// Low-discrepancy starts: the Halton sequence (Halton 1960) with each base's digits permuted
// by the reverse-radix permutation RR2 of Vandewoestyne & Cools (2006), "Good permutations for
// deterministic scrambled Halton sequences in terms of L2-discrepancy", J. Comput. Appl. Math.
// 189. The plain sequence in bases 29 and 31 (dimensions 10 and 11) puts its first points on a
// few lines; the permutation spreads them while keeping the sequence deterministic.
#include "core/survey/survey.h"

#include <array>
#include <stdexcept>

namespace sw::survey {

namespace {

constexpr std::array<int, 64> kPrimes = {2,   3,   5,   7,   11,  13,  17,  19,  23,  29,  31,  37,  41,
                                         43,  47,  53,  59,  61,  67,  71,  73,  79,  83,  89,  97,  101,
                                         103, 107, 109, 113, 127, 131, 137, 139, 149, 151, 157, 163, 167,
                                         173, 179, 181, 191, 193, 197, 199, 211, 223, 227, 229, 233, 239,
                                         241, 251, 257, 263, 269, 271, 277, 281, 283, 293, 307, 311};

const std::vector<int>& permutationFor(int dimensionIndex) {
    static const std::array<std::vector<int>, kPrimes.size()> table = [] {
        std::array<std::vector<int>, kPrimes.size()> t;
        for (std::size_t d = 0; d < kPrimes.size(); ++d) t[d] = reverseRadixPermutation(kPrimes[d]);
        return t;
    }();
    return table[static_cast<std::size_t>(dimensionIndex)];
}

}  // namespace

std::vector<int> reverseRadixPermutation(int base) {
    if (base < 2) throw std::invalid_argument("reverseRadixPermutation: base must be >= 2");
    int bits = 0;
    while ((1 << bits) < base) ++bits;
    std::vector<int> permutation;
    permutation.reserve(static_cast<std::size_t>(base));
    for (int i = 0; i < (1 << bits); ++i) {
        int reversed = 0;
        for (int b = 0; b < bits; ++b)
            if (i & (1 << b)) reversed |= 1 << (bits - 1 - b);
        if (reversed < base) permutation.push_back(reversed);
    }
    return permutation;
}

std::vector<double> haltonPoint(long index, int dimension) {
    if (dimension < 1 || dimension > static_cast<int>(kPrimes.size()))
        throw std::invalid_argument("haltonPoint: dimension must be 1 to " + std::to_string(kPrimes.size()));
    if (index < 1) throw std::invalid_argument("haltonPoint: index must be >= 1");
    std::vector<double> point(static_cast<std::size_t>(dimension));
    for (int d = 0; d < dimension; ++d) {
        const int base = kPrimes[static_cast<std::size_t>(d)];
        const std::vector<int>& permutation = permutationFor(d);
        double scale = 1.0 / base, value = 0;
        for (long k = index; k > 0; k /= base) {
            value += permutation[static_cast<std::size_t>(k % base)] * scale;
            scale /= base;
        }
        point[static_cast<std::size_t>(d)] = value;
    }
    return point;
}

}  // namespace sw::survey
