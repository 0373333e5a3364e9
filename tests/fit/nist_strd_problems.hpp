// Nonlinear regression problems of the NIST Statistical Reference Datasets (StRD), with their data, both
// starting points and the certified values (parameters, their standard deviations, residual sum of squares).
// Source: NIST ITL, StRD Nonlinear Regression, https://www.itl.nist.gov/div898/strd/nls/nls_main.shtml, the
// dataset files <name>.dat (certified to 11 significant digits by NIST in 128-bit arithmetic). Every number below
// is copied from those files as reproduced verbatim in public repositories; none comes from our own code.
#pragma once

#include <Eigen/Core>
#include <cmath>
#include <string>
#include <vector>

namespace spreadfit::testing {

struct StrdProblem {
  std::string name;
  /// Model y = f(b, x), written as in the dataset file's "Model:" line.
  double (*model)(const Eigen::VectorXd& b, double x);
  std::vector<double> x, y;
  std::vector<double> start1, start2;
  std::vector<double> certified;     ///< certified parameter values
  std::vector<double> certified_sd;  ///< certified standard deviations of the parameters
  double certified_rss = 0;          ///< certified residual sum of squares
};

// Misra1a.dat: y = b1*(1-exp[-b2*x]); lower level of difficulty, observed data.
inline StrdProblem misra1a() {
  return {"Misra1a",
          [](const Eigen::VectorXd& b, double x) { return b[0] * (1.0 - std::exp(-b[1] * x)); },
          {77.6, 114.9, 141.1, 190.8, 239.9, 289.0, 332.8, 378.4, 434.8, 477.3, 536.8, 593.1, 689.1, 760.0},
          {10.07, 14.73, 17.94, 23.93, 29.61, 35.18, 40.02, 44.82, 50.76, 55.05, 61.01, 66.40, 75.47, 81.78},
          {500, 1e-4},
          {250, 5e-4},
          {2.3894212918E+02, 5.5015643181E-04},
          {2.7070075241E+00, 7.2668688436E-06},
          1.2455138894E-01};
}

// Chwirut2.dat: y = exp(-b1*x)/(b2+b3*x); lower level of difficulty, observed data.
inline StrdProblem chwirut2() {
  return {
      "Chwirut2",
      [](const Eigen::VectorXd& b, double x) { return std::exp(-b[0] * x) / (b[1] + b[2] * x); },
      {0.5,  1.0,  1.75, 3.75, 5.75, 0.875, 2.25, 3.25, 5.25, 0.75, 1.75, 2.75, 4.75, 0.625, 1.25, 2.25, 4.25, 0.5,
       3.0,  0.75, 3.0,  1.5,  6.0,  3.0,   6.0,  1.5,  3.0,  0.5,  2.0,  4.0,  0.75, 2.0,   5.0,  0.75, 2.25, 3.75,
       5.75, 3.0,  0.75, 2.5,  4.0,  0.75,  2.5,  4.0,  0.75, 2.5,  4.0,  0.5,  6.0,  3.0,   0.5,  2.75, 0.5,  1.75},
      {92.9, 57.1,  31.05, 11.5875, 8.025, 63.6, 21.4,  14.25, 8.475, 63.8,  26.8, 16.4625, 7.125, 67.3,
       41.0, 21.15, 8.175, 81.5,    13.12, 59.9, 14.62, 32.9,  5.44,  12.56, 5.44, 32.0,    13.95, 75.8,
       20.0, 10.42, 59.5,  21.67,   8.55,  62.0, 20.2,  7.76,  3.75,  11.81, 54.7, 23.7,    11.55, 61.3,
       17.7, 8.74,  59.2,  16.3,    8.62,  81.0, 4.87,  14.62, 81.7,  17.17, 81.3, 28.9},
      {0.1, 0.01, 0.02},
      {0.15, 0.008, 0.010},
      {1.6657666537E-01, 5.1653291286E-03, 1.2150007096E-02},
      {3.8303286810E-02, 6.6621605126E-04, 1.5304234767E-03},
      5.1304802941E+02};
}

// MGH09.dat (Kowalik and Osborne; More, Garbow and Hillstrom 1981): y = b1*(x**2+x*b2) / (x**2+x*b3+b4); higher
// level of difficulty, generated data. The file notes a local minimum at (+inf, -14.07..., -inf, -inf).
inline StrdProblem mgh09() {
  return {"MGH09",
          [](const Eigen::VectorXd& b, double x) { return b[0] * (x * x + x * b[1]) / (x * x + x * b[2] + b[3]); },
          {4.0, 2.0, 1.0, 0.5, 0.25, 0.167, 0.125, 0.1, 0.0833, 0.0714, 0.0625},
          {0.1957, 0.1947, 0.1735, 0.16, 0.0844, 0.0627, 0.0456, 0.0342, 0.0323, 0.0235, 0.0246},
          {25, 39, 41.5, 39},
          {0.25, 0.39, 0.415, 0.39},
          {1.9280693458E-01, 1.9128232873E-01, 1.2305650693E-01, 1.3606233068E-01},
          {1.1435312227E-02, 1.9633220911E-01, 8.0842031232E-02, 9.0025542308E-02},
          3.0750560385E-04};
}

// Thurber.dat: y = (b1 + b2*x + b3*x**2 + b4*x**3) / (1 + b5*x + b6*x**2 + b7*x**3); higher level of difficulty,
// observed data.
inline StrdProblem thurber() {
  return {"Thurber",
          [](const Eigen::VectorXd& b, double x) {
            return (b[0] + x * (b[1] + x * (b[2] + x * b[3]))) / (1.0 + x * (b[4] + x * (b[5] + x * b[6])));
          },
          {-3.067, -2.981, -2.921, -2.912, -2.840, -2.797, -2.702, -2.699, -2.633, -2.481, -2.363, -2.322, -1.501,
           -1.460, -1.274, -1.212, -1.100, -1.046, -0.915, -0.714, -0.566, -0.545, -0.400, -0.309, -0.109, -0.103,
           0.010,  0.119,  0.377,  0.790,  0.963,  1.006,  1.115,  1.572,  1.841,  2.047,  2.200},
          {80.574,   84.248,   87.264,   87.195,   89.076,   89.608,   89.868,   90.101,   92.405,   95.854,
           100.696,  101.060,  401.672,  390.724,  567.534,  635.316,  733.054,  759.087,  894.206,  990.785,
           1090.109, 1080.914, 1122.643, 1178.351, 1260.531, 1273.514, 1288.339, 1327.543, 1353.863, 1414.509,
           1425.208, 1421.384, 1442.962, 1464.350, 1468.705, 1447.894, 1457.628},
          {1000, 1000, 400, 40, 0.7, 0.3, 0.03},
          {1300, 1500, 500, 75, 1, 0.4, 0.05},
          {1.2881396800E+03, 1.4910792535E+03, 5.8323836877E+02, 7.5416644291E+01, 9.6629502864E-01, 3.9797285797E-01,
           4.9727297349E-02},
          {4.6647963344E+00, 3.9571156086E+01, 2.8698696102E+01, 5.5675370270E+00, 3.1333340687E-02, 1.4984928198E-02,
           6.5842344623E-03},
          5.6427082397E+03};
}

// Lanczos3.dat (Lanczos 1956, Applied Analysis, pp. 272-280): y = b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x);
// lower level of difficulty, generated data to 5 digits.
inline StrdProblem lanczos3() {
  return {"Lanczos3",
          [](const Eigen::VectorXd& b, double x) {
            return b[0] * std::exp(-b[1] * x) + b[2] * std::exp(-b[3] * x) + b[4] * std::exp(-b[5] * x);
          },
          {0.00, 0.05, 0.10, 0.15, 0.20, 0.25, 0.30, 0.35, 0.40, 0.45, 0.50, 0.55,
           0.60, 0.65, 0.70, 0.75, 0.80, 0.85, 0.90, 0.95, 1.00, 1.05, 1.10, 1.15},
          {2.5134, 2.0443, 1.6684, 1.3664, 1.1232, 0.9269, 0.7679, 0.6389, 0.5338, 0.4479, 0.3776, 0.3197,
           0.2720, 0.2325, 0.1997, 0.1723, 0.1493, 0.1301, 0.1138, 0.1000, 0.0883, 0.0783, 0.0698, 0.0624},
          {1.2, 0.3, 5.6, 5.5, 6.5, 7.6},
          {0.5, 0.7, 3.6, 4.2, 4, 6.3},
          {8.6816414977E-02, 9.5498101505E-01, 8.4400777463E-01, 2.9515951832E+00, 1.5825685901E+00, 4.9863565084E+00},
          {1.7197908859E-02, 9.7041624475E-02, 4.1488663282E-02, 1.0766312506E-01, 5.8371576281E-02, 3.4436403035E-02},
          1.6117193594E-08};
}

}  // namespace spreadfit::testing
