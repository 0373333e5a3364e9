"""Independent reference of spreadfit's thin-film models, in Python with NumPy and SciPy only.

The same published equations spreadfit solves for the gated channel and the plate (README "Models"), written
the way one would script them with general-purpose tools, and sharing no code or method with spreadfit:

  * lubrication equation of a thin Herschel-Bulkley layer on a horizontal no-slip base (Huppert 1982 for the
    Newtonian case; Balmforth, Craster, Rust & Sassi 2006 for the Herschel-Bulkley film),
        h_t + (1/r^s) d/dr (r^s q) = 0,   s = 0 (channel) or 1 (plate),
    with the film flux per unit width down the slope (Liu & Mei 1989; Balmforth et al. 2006):
        G = rho g |h_r|,  Y = h - tau_y / G  (thickness of the sheared layer below the plug),
        q = 0 if Y <= 0, else q = n/(n+1) (G/K)^(1/n) Y^(1+1/n) (h - n Y/(2n+1));
  * in the channel, the flux times the laminar rectangular-duct factor at the local depth (the free surface a
    symmetry plane, so a channel of depth h and width W is half of a duct of height 2h; duct series as in White,
    Viscous Fluid Flow, from memory), applied to every law as spreadfit's model does;
  * release from rest: a block of uniform height V/(W L0) against the end wall x = 0 (channel) or a cylinder of
    height V/(pi R0^2) (plate); readings are the front position minus L0 (channel) and the front radius or
    diameter (plate).

Numerics (independent of spreadfit's Lagrangian method of lines): conservative finite volumes on a fixed uniform
Eulerian grid over a dry bed, face depth the mean of the two cells, face slope the difference of the cell values;
time integration by scipy.integrate.solve_ivp(method="BDF") with the analytic tridiagonal Jacobian as a sparse
matrix. The front is the dry/wet boundary, read inside the grid by extrapolating the local front profile
h^p ~ d of the cells just behind it (FiniteVolumeSpreading.front); halving the cell size shows the reading
converged (check_spreadfit_against_scipy.py prints it). The scheme is first order at the front, and the fixed grid
leaves a ripple of a few hundredths of a percent in the readings as the front crosses cells.

Only python3, numpy and scipy (Debian's python3-numpy, python3-scipy) are used.
"""

import math

import numpy as np
import scipy.integrate
import scipy.optimize
import scipy.sparse

STANDARD_GRAVITY = 9.80665  # m/s^2, CGPM 1901 conventional value


# ---- constitutive law and film flux ---------------------------------------------------------------------------

def film_flux(G, h, tau_y, K, n):
    """Herschel-Bulkley film flux q(G, h) >= 0 per unit width and its partial derivatives dq/dG, dq/dh (arrays).

    q = c (G/K)^(1/n) Y^m (h - a Y), c = n/(n+1), m = 1 + 1/n, a = n/(2n+1), Y = h - tau_y/G (Balmforth et al.
    2006, eq. for the depth-integrated flux). Differentiated by hand:
      dq/dh |_G = c (G/K)^(1/n) [m Y^(m-1) (h - aY) + (1 - a) Y^m]      (dY/dh = 1)
      dq/dG |_h = q/(n G) + c (G/K)^(1/n) [m Y^(m-1) (h - aY) - a Y^m] tau_y/G^2   (dY/dG = tau_y/G^2)
    """
    G = np.asarray(G, dtype=float)
    h = np.asarray(h, dtype=float)
    c, m, a = n / (n + 1.0), 1.0 + 1.0 / n, n / (2.0 * n + 1.0)
    q = np.zeros_like(h)
    q_G = np.zeros_like(h)
    q_h = np.zeros_like(h)
    pos = (G > 0) & (h > 0)
    Gp, hp = G[pos], h[pos]
    Y = hp - tau_y / Gp
    yielded = Y > 0
    idx = np.flatnonzero(pos)[yielded]
    Gy, hy, Yy = Gp[yielded], hp[yielded], Y[yielded]
    pre = c * (Gy / K) ** (1.0 / n)
    Ym1 = Yy ** (m - 1.0)
    qq = pre * Ym1 * Yy * (hy - a * Yy)
    dY_part = pre * m * Ym1 * (hy - a * Yy)
    q[idx] = qq
    q_h[idx] = dY_part + pre * (1.0 - a) * Ym1 * Yy
    q_G[idx] = qq / (n * Gy)
    if tau_y > 0:
        q_G[idx] += (dY_part - pre * a * Ym1 * Yy) * (tau_y / Gy) / Gy
    # Zero slope with some depth: the limit of dq/dG is h^3/(3K) for a Newtonian layer without yield stress
    # (q = G h^3 / (3 mu)); 0 for n < 1 or a yield stress; n > 1 (infinite) is not used here.
    if tau_y == 0.0 and n == 1.0:
        flat = (G <= 0) & (h > 0)
        q_G[flat] = h[flat] ** 3 / (3.0 * K)
    return q, q_G, q_h


# ---- side-wall factor ------------------------------------------------------------------------------------------

# Odd k whose tanh(k pi/(2a)) differs from 1 in double precision for some a <= 1 (k pi / 2 < 20); the remaining
# terms add their 1/k^5 exactly, through the full odd sum (31/32) zeta(5).
_ODD_K = np.arange(1, 15, 2, dtype=float)
_ODD_ZETA5 = sum(1.0 / k ** 5 for k in range(1, 200001, 2))


def _duct_bracket(a):
    """Bracket of the laminar duct flux for aspect ratio a <= 1 (short side / long side) and its derivative:
    B(a) = 1 - (192 a / pi^5) sum_{k odd} tanh(k pi / (2a)) / k^5."""
    a = np.asarray(a, dtype=float)[..., None]
    # tanh is 1 and sech^2 is 0 to double precision once x > 20: clip to keep thin layers finite
    x = np.minimum(_ODD_K * math.pi / (2.0 * a), 40.0)
    e = np.exp(-2.0 * x)
    k5 = _ODD_K ** 5
    S = _ODD_ZETA5 - np.sum(2.0 * e / (1.0 + e) / k5, axis=-1)  # 1 - tanh x = 2 e^-2x / (1 + e^-2x)
    sech2 = 4.0 * e / (1.0 + e) ** 2
    dS = np.sum(sech2 * (-x / a) / k5, axis=-1)  # d/da tanh(k pi/(2a)) = sech^2 * (-k pi / (2 a^2))
    C = 192.0 / math.pi ** 5
    a = a[..., 0]
    return 1.0 - C * a * S, -C * S - C * a * dS


def side_wall_factor(r):
    """Open-channel flux factor at depth/width r (the duct of height 2h, width W, over the planar film flux) and
    its derivative in r. For 2h > W the duct's sides swap roles: Q = (W^3 b G / 12 mu) B(W/b)."""
    r = np.asarray(r, dtype=float)
    f = np.ones_like(r)
    df = np.zeros_like(r)
    # very thin layers: tanh = 1 in every term, B = 1 - (192/pi^5) 2r sum 1/k^5 (no overflow in k pi/(2a))
    thin = (r > 0) & (r < 1e-6)
    odd_zeta5 = _ODD_ZETA5
    f[thin] = 1.0 - 2.0 * 192.0 / math.pi ** 5 * odd_zeta5 * r[thin]
    df[thin] = -2.0 * 192.0 / math.pi ** 5 * odd_zeta5
    low = (r >= 1e-6) & (2.0 * r <= 1.0)
    B, dB = _duct_bracket(2.0 * r[low])
    f[low], df[low] = B, 2.0 * dB
    high = 2.0 * r > 1.0
    a = 1.0 / (2.0 * r[high])
    B, dB = _duct_bracket(a)
    f[high] = a * a * B
    df[high] = (2.0 * a * B + a * a * dB) * (-2.0 * a * a)
    return f, df


# ---- rigs ------------------------------------------------------------------------------------------------------

class Channel:
    """Gated channel: width W, block length L0 behind the gate, sample volume V; reading = front - L0."""

    def __init__(self, width, reservoir_length, volume, density, side_wall_drag=True, gravity=STANDARD_GRAVITY):
        self.width, self.L0, self.volume = width, reservoir_length, volume
        self.density, self.gravity, self.side_wall_drag = density, gravity, side_wall_drag
        self.axisymmetric = False
        self.extent = reservoir_length
        self.height = volume / (width * reservoir_length)

    def reading(self, front):
        return front - self.L0


class Plate:
    """Plate after a ring lift: ring radius R0, sample volume V; reading = front radius (or diameter)."""

    def __init__(self, ring_radius, volume, density, diameter=False, gravity=STANDARD_GRAVITY):
        self.R0, self.volume, self.density, self.gravity = ring_radius, volume, density, gravity
        self.diameter = diameter
        self.axisymmetric = True
        self.side_wall_drag = False
        self.width = 0.0
        self.extent = ring_radius
        self.height = volume / (math.pi * ring_radius ** 2)

    def reading(self, front):
        return 2.0 * front if self.diameter else front


# ---- finite-volume system --------------------------------------------------------------------------------------

class FiniteVolumeSpreading:
    """Cells [x_{i-1/2}, x_{i+1/2}] of width dx on [0, domain]; state h_i (cell averages, m)."""

    def __init__(self, rig, material, cell_size, domain):
        self.rig = rig
        self.tau, self.K, self.n = material
        self.dx = cell_size
        self.cells = int(math.ceil(domain / cell_size))
        self.faces = np.arange(self.cells + 1) * cell_size
        self.centres = 0.5 * (self.faces[1:] + self.faces[:-1])
        self.rho_g = rig.density * rig.gravity
        if rig.axisymmetric:
            # cell "area" per radian: integral of r dr; interior face weight r_{i+1/2}
            self.area = 0.5 * (self.faces[1:] ** 2 - self.faces[:-1] ** 2)
            self.face_weight = self.faces[1:-1]
        else:
            self.area = np.full(self.cells, cell_size)
            self.face_weight = np.ones(self.cells - 1)
        # Release: uniform height over [0, extent], the last partly covered cell holding its share of the volume.
        cover = np.clip((rig.extent - self.faces[:-1]) / cell_size, 0.0, 1.0)
        if rig.axisymmetric:
            right = np.minimum(self.faces[1:], rig.extent)
            covered = 0.5 * np.clip(right ** 2 - self.faces[:-1] ** 2, 0.0, None)
            self.h0 = rig.height * covered / self.area
        else:
            self.h0 = rig.height * cover

    def _face_fluxes(self, h):
        """Flux through every interior face (positive outward, i.e. towards larger x) and its derivatives in the
        left and right cell values."""
        hc = np.maximum(h, 0.0)
        hl, hr = hc[:-1], hc[1:]
        dh = hr - hl
        sign = np.where(dh > 0, 1.0, -1.0)
        G = self.rho_g * np.abs(dh) / self.dx
        depth = 0.5 * (hl + hr)
        Q, Q_G, Q_h = film_flux(G, depth, self.tau, self.K, self.n)
        if self.rig.side_wall_drag:
            W = self.rig.width
            F, dF = side_wall_factor(depth / W)
            Q_h = Q_h * F + Q * dF / W
            Q, Q_G = Q * F, Q_G * F
        # q = -sign(dh) Q(G, depth): dq/dh_r = -rho g Q_G / dx - sign Q_h / 2, dq/dh_l = rho g Q_G / dx - sign Q_h / 2
        q = -sign * Q
        dq_dr = -self.rho_g * Q_G / self.dx - 0.5 * sign * Q_h
        dq_dl = self.rho_g * Q_G / self.dx - 0.5 * sign * Q_h
        # clipped (negative) cells carry no depth
        dq_dr = np.where(h[1:] > 0, dq_dr, 0.0)
        dq_dl = np.where(h[:-1] > 0, dq_dl, 0.0)
        return q, dq_dl, dq_dr

    def rhs(self, t, h):
        q, _, _ = self._face_fluxes(h)
        flow = self.face_weight * q  # through face i+1/2, from cell i to i+1
        dhdt = np.zeros_like(h)
        dhdt[:-1] -= flow
        dhdt[1:] += flow
        return dhdt / self.area

    def jacobian(self, t, h):
        # dh_i/dt = (F_{i-1/2} - F_{i+1/2}) / A_i, F_{i+1/2} = w_{i+1/2} q(h_i, h_{i+1}): tridiagonal.
        _, dq_dl, dq_dr = self._face_fluxes(h)
        wl, wr = self.face_weight * dq_dl, self.face_weight * dq_dr
        N = self.cells
        diag = np.zeros(N)
        diag[:-1] -= wl
        diag[1:] += wr
        upper = -wr  # d(dh_i/dt)/dh_{i+1}, i = 0..N-2
        lower = wl   # d(dh_{i+1}/dt)/dh_i
        diag /= self.area
        upper = upper / self.area[:-1]
        lower = lower / self.area[1:]
        return scipy.sparse.diags([lower, diag, upper], [-1, 0, 1], format="csc")

    def front(self, h):
        """Front position [m], read inside the grid. Near a front over a dry bed the profile is a power of the
        distance d to the front, h = c d^(1/p): p = n + 2 behind an advancing power-law front (Gratton, Minotti &
        Mahajan 1999), p = 2 at an arrested yield-stress front (static balance rho g h h_x = tau_y, the plastic
        limit of Roussel & Coussot 2005), in between while a yield-stress front slows down. The last two wet cells
        are distorted by the dry/wet switch of the fixed grid, so the cells before them are used: without a yield
        stress a straight line through h^(n+2) of four cells; with one, the p that makes h^p of five cells most
        nearly straight, and that line. Either line extrapolated to h^p = 0 gives the front."""
        wet = np.flatnonzero(h > 1e-9 * self.rig.height)
        if wet.size == 0:
            raise RuntimeError("no wet cell")
        k = wet[-1]
        if k + 2 >= self.cells or k < 6:
            raise RuntimeError("the front reached the end of the computational domain")
        if self.tau == 0.0:
            # no yield stress: p = n + 2 exactly; a straight line through four cells averages the cell-scale ripple
            cells = np.arange(k - 5, k - 1)
            slope, intercept = np.polyfit(self.centres[cells], np.maximum(h[cells], 0.0) ** (self.n + 2.0), 1)
            return -intercept / slope
        # with a yield stress: the exponent p in [2, n + 2] (plastic to power-law tip) that makes h^p of five cells
        # most nearly a straight line (least squares, residual relative to the line's span)
        cells = np.arange(k - 6, k - 1)
        x = self.centres[cells] - self.centres[k - 2]
        hn = np.maximum(h[cells], 0.0) / self.rig.height

        def misfit(p):
            y = hn ** p
            coef, res, *_ = np.polyfit(x, y, 1, full=True)
            return (res[0] if res.size else 0.0) / (y[0] - y[-1]) ** 2

        lo, hi = min(2.0, self.n + 2.0), max(2.0, self.n + 2.0)
        p = scipy.optimize.minimize_scalar(misfit, bounds=(lo, hi), method="bounded",
                                           options={"xatol": 1e-6}).x if hi > lo else lo
        slope, intercept = np.polyfit(x, hn ** p, 1)
        return self.centres[k - 2] - intercept / slope


def solve(rig, material, times, cell_size, domain, rtol=1e-6, atol_scale=1e-9):
    """Readings of the rig at `times` [s] for material (tau_y [Pa], K [Pa s^n], n [-]). Returns (readings, info)."""
    system = FiniteVolumeSpreading(rig, material, cell_size, domain)
    times = np.asarray(times, dtype=float)
    t_eval = times[times > 0]
    sol = scipy.integrate.solve_ivp(system.rhs, (0.0, float(t_eval[-1])), system.h0, method="BDF", t_eval=t_eval,
                                    jac=system.jacobian, rtol=rtol, atol=atol_scale * rig.height)
    if not sol.success:
        raise RuntimeError("solve_ivp: " + sol.message)
    fronts = [system.front(sol.y[:, j]) for j in range(sol.y.shape[1])]
    readings = np.array([rig.reading(rig.extent)] * int(np.sum(times <= 0)) + [rig.reading(f) for f in fronts])
    mass0 = np.sum(system.area * system.h0)
    mass1 = np.sum(system.area * sol.y[:, -1])
    info = {"steps": int(sol.t.size), "nfev": int(sol.nfev), "njev": int(sol.njev), "nlu": int(sol.nlu),
            "cells": system.cells, "mass_change": abs(mass1 / mass0 - 1.0)}
    return readings, info


# ---- least-squares fit -----------------------------------------------------------------------------------------

def fit_herschel_bulkley(rig, times, values, start, cell_size, domain, rtol=1e-6, fit_time_origin=True,
                         bounds=((1e-3, 1e3), (1e-3, 1e4), (0.1, 2.0)), time_origin_bounds=(-5.0, 5.0)):
    """Least-squares Herschel-Bulkley fit (scipy.optimize.least_squares, trust-region reflective, 2-point
    finite-difference Jacobian, readings weighted equally) of log tau_y, log K, n and a release time t0, the model read at max(t - t0, 0).
    Returns (material, t0, result, solves)."""
    times = np.asarray(times, dtype=float)
    values = np.asarray(values, dtype=float)
    solves = [0]

    def unpack(p):
        return (math.exp(p[0]), math.exp(p[1]), p[2]), (p[3] if fit_time_origin else 0.0)

    def residuals(p):
        material, t0 = unpack(p)
        solves[0] += 1
        model, _ = solve(rig, material, np.maximum(times - t0, 0.0), cell_size, domain, rtol)
        return model - values

    lo = [math.log(bounds[0][0]), math.log(bounds[1][0]), bounds[2][0]]
    hi = [math.log(bounds[0][1]), math.log(bounds[1][1]), bounds[2][1]]
    p0 = [math.log(start[0][0]), math.log(start[0][1]), start[0][2]]
    if fit_time_origin:
        lo.append(time_origin_bounds[0])
        hi.append(time_origin_bounds[1])
        p0.append(start[1])
    # diff_step: the fixed grid and the stepper's tolerance make the readings smooth only down to about 1e-5
    # relative, so the finite-difference step is 1e-3 of each parameter (the default 1.5e-8 sees only that noise).
    result = scipy.optimize.least_squares(residuals, p0, bounds=(lo, hi), diff_step=1e-3, xtol=1e-6, ftol=1e-8)
    material, t0 = unpack(result.x)
    return material, t0, result, solves[0]
