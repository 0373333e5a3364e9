// A law the user names is fitted as `auto` fits the law it reports (src/fit/fit_law.hpp, fit_named): the same
// starts, the same valleys, the same intervals. A named Herschel-Bulkley fit that searched on its own settled in
// other valleys: in a sweep of 85 curves its intervals differed from auto's in 6, one bound excluding the truth,
// and one channel curve stopped on the iteration limit where auto converged. Defining property, no outside source.
#include <doctest/doctest.h>

#include <cmath>

#include "fit_test_support.hpp"
#include "src/fit/fit_law.hpp"

using namespace spreadfit;
using namespace spreadfit::testing;

TEST_CASE("a named Herschel-Bulkley fit reports what auto reports for that law") {
  // Shear-thinning yield-stress pastes on each rig (reading noise 0.5 mm; squeeze 0.2 mm), 90 s read every 3 s.
  struct Case {
    TestSetup setup;
    Material truth;
    double sigma;
  };
  const Case cases[] = {{channel_setup(), {85.4, 33.6, 0.60}, 5e-4},
                        {plate_setup(), {22.3, 8.0, 0.45}, 5e-4},
                        {squeeze_setup(), {3.0, 12.0, 0.5}, 2e-4}};
  unsigned seed = 900;
  for (const Case& c : cases) {
    const fit::FitSeries s = synthetic(c.setup, c.truth, c.sigma, ++seed, 0.3, 3.0, 90.0);
    REQUIRE(s.values.size() == 30);
    const fit::FitResult named = fit::fit_named({s}, Law::HerschelBulkley);
    const fit::ModelChoice choice = fit::fit_auto({s});
    INFO("seed " << seed << ": " << fit::fit_status_name(named.status) << " " << named.reason);
    REQUIRE(named.converged());
    REQUIRE(choice.chosen == choice.index_of(Law::HerschelBulkley));
    const fit::FitResult& reported = choice.candidates[std::size_t(choice.chosen)];
    REQUIRE(named.parameters.size() == reported.parameters.size());
    for (std::size_t i = 0; i < named.parameters.size(); ++i) {
      const fit::ParameterEstimate& a = named.parameters[i];
      const fit::ParameterEstimate& b = reported.parameters[i];
      INFO(a.name << ": named " << a.value << " [" << a.lower << ", " << a.upper << "], auto " << b.value << " ["
                  << b.lower << ", " << b.upper << "]");
      CHECK(a.value == b.value);
      CHECK(a.lower == b.lower);
      CHECK(a.upper == b.upper);
      CHECK(a.upper_only == b.upper_only);
    }
    // Its solves count the special cases' fits too: more than the reported fit alone spends in auto.
    CHECK(named.evaluations >= reported.evaluations);
  }
}
