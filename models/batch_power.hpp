// Many powers x^a of positive numbers at once, for the thin-film right-hand side: one power per node per evaluation
// is about a quarter of a forward solve when taken one at a time (exp(a log x), two scalar calls).
#pragma once

#include <cstddef>

namespace spreadfit {

/// y[i] = x[i]^a = exp(a log x[i]) for x[i] > 0 (x and y may be the same array). Where the processor has AVX2 and
/// the C library has its vector math library (glibc's libmvec), four at a time with its exp and log (within 4 ulp
/// of the scalar functions, glibc manual "Errors in Math Functions"); otherwise std::exp(a std::log(x)).
void positive_powers(const double* x, double a, double* y, std::size_t count);

/// True when positive_powers uses the vector math library on this machine (for the bench's report).
bool positive_powers_vectorised();

}  // namespace spreadfit
