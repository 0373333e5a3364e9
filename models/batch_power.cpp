#include "models/batch_power.hpp"

#include <cmath>

#if defined(__x86_64__) && defined(__GLIBC__) && defined(SPREADFIT_HAVE_LIBMVEC)
#include <immintrin.h>
#define SPREADFIT_VECTOR_POWERS 1
// glibc's vector math library, AVX2 variants, in the x86_64 vector function ABI's names (libmvec, glibc >= 2.22).
extern "C" __attribute__((target("avx2"))) __m256d _ZGVdN4v_exp(__m256d);
extern "C" __attribute__((target("avx2"))) __m256d _ZGVdN4v_log(__m256d);
#endif

namespace spreadfit {

namespace {

void scalar_powers(const double* x, double a, double* y, std::size_t count) {
  for (std::size_t i = 0; i < count; ++i) y[i] = std::exp(a * std::log(x[i]));
}

#ifdef SPREADFIT_VECTOR_POWERS
__attribute__((target("avx2"))) void avx2_powers(const double* x, double a, double* y, std::size_t count) {
  const __m256d av = _mm256_set1_pd(a);
  std::size_t i = 0;
  for (; i + 4 <= count; i += 4)
    _mm256_storeu_pd(y + i, _ZGVdN4v_exp(_mm256_mul_pd(av, _ZGVdN4v_log(_mm256_loadu_pd(x + i)))));
  scalar_powers(x + i, a, y + i, count - i);
}

bool cpu_has_avx2() {
  static const bool yes = __builtin_cpu_supports("avx2");
  return yes;
}
#endif

}  // namespace

void positive_powers(const double* x, double a, double* y, std::size_t count) {
#ifdef SPREADFIT_VECTOR_POWERS
  if (cpu_has_avx2()) return avx2_powers(x, a, y, count);
#endif
  scalar_powers(x, a, y, count);
}

bool positive_powers_vectorised() {
#ifdef SPREADFIT_VECTOR_POWERS
  return cpu_has_avx2();
#else
  return false;
#endif
}

}  // namespace spreadfit
