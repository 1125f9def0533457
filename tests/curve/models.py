"""Reference transfer curves with known answers, used to generate and check the fixtures.

Two models, both outside the code under test:

- a logistic stage ``Vout = A / (1 + exp(k (Vin - Vm)))`` (inverting; ``-k`` gives the
  non-inverting one), whose unity-gain points have a closed form (derived in
  :func:`logistic_unity_points`);
- a long-channel CMOS inverter with square-law transistors (cutoff, saturation, linear region
  for each device, no channel-length modulation): "square-law long-channel MOSFET model, standard
  digital-IC textbook result, from memory". Its output at each input is the root of
  ``Id_n(Vin, Vout) = Id_p(Vin, Vout)``, found with ``scipy.optimize.brentq``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq


@dataclass(frozen=True)
class Logistic:
    """``Vout = offset + swing / (1 + exp(sign * k * (Vin - centre)))``; sign +1 inverts."""

    swing: float
    k: float
    centre: float
    inverting: bool = True
    offset: float = 0.0

    def vout(self, vin: np.ndarray | float) -> np.ndarray:
        sign = 1.0 if self.inverting else -1.0
        return self.offset + self.swing / (1.0 + np.exp(sign * self.k * (np.asarray(vin, dtype=float) - self.centre)))

    @property
    def peak_gain(self) -> float:
        # |dVout/dVin| = A k s (1 - s), largest at s = 1/2: A k / 4.
        return self.swing * self.k / 4.0


def logistic_unity_points(model: Logistic) -> tuple[float, float, float, float]:
    """(vil_max, vih_min, voh_min, vol_max) of a logistic stage, in closed form.

    Inverting case. With s = 1 / (1 + exp(k (x - Vm))), ds/dx = -k s (1 - s), so
    dVout/dVin = -A k s (1 - s). Unity gain: A k s (1 - s) = 1, i.e. s^2 - s + 1/(A k) = 0, so
    s = (1 +/- sqrt(1 - 4 / (A k))) / 2 (real when A k > 4, i.e. peak gain A k / 4 > 1).
    Inverting s back: 1/s - 1 = exp(k (x - Vm)), x = Vm + ln(1/s - 1) / k. The larger s (output
    near the top) gives the lower input, vil_max; there Vout = offset + A s_plus is voh_min, and
    the smaller s gives vih_min with vol_max = offset + A s_minus.

    Non-inverting case: s = 1 / (1 + exp(-k (x - Vm))), x = Vm - ln(1/s - 1) / k; the smaller s
    now gives the lower input, vil_max, with Vout = vol_max, and the larger s gives vih_min, voh_min.
    """
    root = math.sqrt(1.0 - 4.0 / (model.swing * model.k))
    s_plus, s_minus = (1.0 + root) / 2.0, (1.0 - root) / 2.0
    if model.inverting:
        vil = model.centre + math.log(1.0 / s_plus - 1.0) / model.k
        vih = model.centre + math.log(1.0 / s_minus - 1.0) / model.k
        return vil, vih, model.offset + model.swing * s_plus, model.offset + model.swing * s_minus
    vil = model.centre - math.log(1.0 / s_minus - 1.0) / model.k
    vih = model.centre - math.log(1.0 / s_plus - 1.0) / model.k
    return vil, vih, model.offset + model.swing * s_plus, model.offset + model.swing * s_minus


def logistic_threshold(model: Logistic, low: float, high: float) -> float:
    """Where Vout = Vin, by brentq on the model itself (no closed form)."""
    return float(brentq(lambda x: float(model.vout(x)) - x, low, high, xtol=1e-14))


@dataclass(frozen=True)
class SquareLawInverter:
    """A CMOS inverter of square-law long-channel transistors (volts, amps per volt squared)."""

    vdd: float
    vtn: float
    vtp: float  # magnitude |VTp|
    kn: float
    kp: float

    def nmos_current(self, vin: float, vout: float) -> float:
        overdrive = vin - self.vtn
        if overdrive <= 0:
            return 0.0  # cutoff
        if vout >= overdrive:
            return self.kn / 2.0 * overdrive**2  # saturation
        return self.kn * (overdrive * vout - vout**2 / 2.0)  # linear

    def pmos_current(self, vin: float, vout: float) -> float:
        overdrive = self.vdd - vin - self.vtp
        drop = self.vdd - vout
        if overdrive <= 0:
            return 0.0
        if drop >= overdrive:
            return self.kp / 2.0 * overdrive**2
        return self.kp * (overdrive * drop - drop**2 / 2.0)

    def vout(self, vin: float) -> float:
        """The output where the NMOS sinks what the PMOS sources."""
        balance = lambda v: self.nmos_current(vin, v) - self.pmos_current(vin, v)  # noqa: E731
        at_ground, at_supply = balance(0.0), balance(self.vdd)
        if at_ground >= 0.0:
            return 0.0  # PMOS off: the NMOS holds the output at ground
        if at_supply <= 0.0:
            return self.vdd  # NMOS off: the PMOS holds the output at the supply
        return float(brentq(balance, 0.0, self.vdd, xtol=1e-13))

    def switching_threshold(self) -> float:
        """VM = (VDD - |VTp| + VTn sqrt(kn/kp)) / (1 + sqrt(kn/kp)): both devices saturated,
        kn (VM - VTn)^2 = kp (VDD - VM - |VTp|)^2. Square-law long-channel MOSFET model, standard
        digital-IC textbook result, from memory."""
        ratio = math.sqrt(self.kn / self.kp)
        return (self.vdd - self.vtp + self.vtn * ratio) / (1.0 + ratio)

    def unity_points(self) -> tuple[float, float, float, float]:
        """(vil_max, vih_min, voh_min, vol_max), closed forms derived from the square law.

        Notation: r = kn/kp, a = Vin - VTn (NMOS overdrive), u = VDD - Vin - |VTp| (PMOS
        overdrive), D = a + u = VDD - VTn - |VTp| (the same for every input).

        vil_max: NMOS saturated, PMOS linear with y = VDD - Vout:
            r a^2 / 2 = u y - y^2 / 2.
        Differentiate in Vin with dVout/dVin = -1 (so dy/dVin = +1, da = +1, du = -1):
            r a = -y + u - y, hence y = (u - r a) / 2.
        Substitute: u y - y^2/2 = y (u - y/2) = (u - r a)(3u + r a) / 8, so
            4 r a^2 = 3 u^2 - 2 r a u - r^2 a^2, i.e. (r^2 + 4 r) t^2 + 2 r t - 3 = 0 with t = a/u:
            t = (2 sqrt(r (r + 3)) - r) / (r (r + 4)),   a = t D / (1 + t),   vil_max = VTn + a,
            voh_min = VDD - (u - r a) / 2.
        For r = 1: t = 3/5, a = 3D/8, vil_max = (3 VDD + 2 VT) / 8 when VTn = |VTp| = VT.

        vih_min: NMOS linear, PMOS saturated:
            r (a Vout - Vout^2 / 2) = u^2 / 2.
        Differentiate with dVout/dVin = -1:  r (Vout - a + Vout) = -u, hence Vout = (r a - u) / (2 r).
        Substitute: r Vout (a - Vout/2) = (r a - u)(3 r a + u) / (8 r) = u^2 / 2, so
            3 r^2 t^2 - 2 r t - (1 + 4 r) = 0:   t = (1 + 2 sqrt(1 + 3 r)) / (3 r),
            a = t D / (1 + t),   vih_min = VTn + a,   vol_max = (r a - u) / (2 r).
        For r = 1: t = 5/3, a = 5D/8, vih_min = (5 VDD - 2 VT) / 8.
        """
        r = self.kn / self.kp
        span = self.vdd - self.vtn - self.vtp
        t_low = (2.0 * math.sqrt(r * (r + 3.0)) - r) / (r * (r + 4.0))
        a_low = t_low * span / (1.0 + t_low)
        vil = self.vtn + a_low
        voh = self.vdd - (span - a_low - r * a_low) / 2.0
        t_high = (1.0 + 2.0 * math.sqrt(1.0 + 3.0 * r)) / (3.0 * r)
        a_high = t_high * span / (1.0 + t_high)
        vih = self.vtn + a_high
        vol = (r * a_high - (span - a_high)) / (2.0 * r)
        return vil, vih, voh, vol
