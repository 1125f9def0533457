"""Generate the CSV fixtures of tests/curve/fixtures/ from the reference models (all invented data).

Run ``python -m tests.curve.make_fixtures`` from the project root to rewrite them; the test
``test_fixtures_match_their_models`` checks that the files on disk still hold these curves.
Every curve is a model, not a measurement of any real part.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import numpy as np

from tests.curve.models import Logistic, SquareLawInverter

FIXTURES_DIR = Path(__file__).resolve().parent / "fixtures"

# The models behind the fixtures; tests import them to compute the expected answers.
INVERTER = Logistic(swing=3.3, k=10.0, centre=1.6)  # peak gain 3.3 * 10 / 4 = 8.25
BUFFER = Logistic(swing=5.0, k=8.0, centre=2.5, inverting=False)  # peak gain 10
ATTENUATOR = Logistic(swing=3.3, k=3.6 / 3.3, centre=1.65)  # peak gain 3.6 / 4 = 0.9
LOW_SWING = Logistic(swing=1.0, k=10.0, centre=1.6, offset=0.5)  # output 0.5 .. 1.5 V only
STEP_ONE = Logistic(swing=1.65, k=20.0, centre=1.2)
STEP_TWO = Logistic(swing=1.65, k=20.0, centre=2.0)
SYMMETRIC_CMOS = SquareLawInverter(vdd=5.0, vtn=1.0, vtp=1.0, kn=100e-6, kp=100e-6)
RATIOED_CMOS = SquareLawInverter(vdd=3.3, vtn=0.5, vtp=0.6, kn=250e-6, kp=100e-6)
NOISE_SIGMA = 0.020  # volts rms added to the noisy fixtures
WIGGLE_AMPLITUDE = 0.030  # volts; its slope peaks near 0.030 * 2 pi / 0.15 = 1.26 > 1
WIGGLE_PERIOD = 0.15


def two_step(vin: np.ndarray) -> np.ndarray:
    """Two inverting steps in series along the input axis: a kink at mid-swing."""
    return STEP_ONE.vout(vin) + STEP_TWO.vout(vin)


def plateau_wiggle(vin: np.ndarray) -> np.ndarray:
    """The inverter with a ripple on its high plateau (0.1 .. 0.7 V), windowed to start smoothly."""
    window = np.where((vin > 0.1) & (vin < 0.7), np.sin(np.pi * (vin - 0.1) / 0.6) ** 2, 0.0)
    return INVERTER.vout(vin) + window * WIGGLE_AMPLITUDE * np.sin(2 * np.pi * vin / WIGGLE_PERIOD)


def _rows(vin: np.ndarray, vout: np.ndarray, header: str | None = "vin_V,vout_V") -> str:
    lines = [header] if header else []
    lines += [f"{a:.6f},{b:.6f}" for a, b in zip(vin, vout)]
    return "\n".join(lines) + "\n"


def _sweep(low: float, high: float, step: float) -> np.ndarray:
    return np.round(np.linspace(low, high, int(round((high - low) / step)) + 1), 9)


def _noisy(model: Callable[[np.ndarray], np.ndarray], low: float, high: float, seed: int) -> str:
    """Three shuffled, noisy rows per input every 10 mV: repeated inputs, any order."""
    rng = np.random.default_rng(seed)
    vin = rng.permutation(np.repeat(_sweep(low, high, 0.01), 3))
    vout = model(vin) + rng.normal(0.0, NOISE_SIGMA, vin.size)
    comment = f"# invented data: model plus {NOISE_SIGMA * 1000:.0f} mV rms noise, seed {seed}"
    return comment + "\n" + _rows(vin, vout)


def _cmos(model: SquareLawInverter) -> str:
    # 1000 points, so that the grid never lands exactly on the vertical segment at VM.
    vin = np.linspace(0.0, model.vdd, 1000)
    return _rows(vin, np.array([model.vout(float(v)) for v in vin]))


def _flat() -> str:
    rng = np.random.default_rng(11)
    vin = _sweep(0.0, 3.3, 0.05)
    return _rows(vin, 1.2 + rng.normal(0.0, 0.001, vin.size))


def fixture_texts() -> dict[str, str | bytes]:
    clean = _sweep(0.0, 3.3, 0.01)
    fine = _sweep(0.0, 3.3, 0.005)
    buffer_sweep = _sweep(0.0, 5.0, 0.01)
    partial = _sweep(1.4, 3.3, 0.01)
    return {
        "inverter_clean.csv": _rows(clean, INVERTER.vout(clean)),
        "inverter_noisy.csv": _noisy(INVERTER.vout, 0.0, 3.3, seed=7),
        "buffer_clean.csv": _rows(buffer_sweep, BUFFER.vout(buffer_sweep), header=None),
        "buffer_noisy.csv": _noisy(BUFFER.vout, 0.0, 5.0, seed=8),
        "cmos_symmetric.csv": _cmos(SYMMETRIC_CMOS),
        "cmos_ratioed.csv": _cmos(RATIOED_CMOS),
        "attenuator.csv": _rows(clean, ATTENUATOR.vout(clean)),
        "low_swing.csv": _rows(clean, LOW_SWING.vout(clean)),
        "two_step.csv": _rows(fine, two_step(fine)),
        "plateau_wiggle.csv": _rows(fine, plateau_wiggle(fine)),
        "partial_sweep.csv": _rows(partial, INVERTER.vout(partial)),
        "flat.csv": _flat(),
        "bad_non_numeric.csv": "vin,vout\n0.0,3.3\n0.5,3.2\n1.0, 3.1V\n1.5,0.2\n",
        "bad_too_few.csv": "vin,vout\n0.0,3.3\n0.5,3.3\n1.0,3.0\n1.5,0.3\n2.0,0.0\n",
        "bad_empty.csv": "",
        "bad_nan.csv": "vin,vout\n0.0,3.3\nnan,3.2\n1.0,3.1\n",
        "bad_columns.csv": "vin,vout\n0.0,3.3\n0.5,3.2,9\n",
        "bad_binary.csv": bytes(range(256)),
    }


def write_fixtures(folder: Path = FIXTURES_DIR) -> None:
    folder.mkdir(parents=True, exist_ok=True)
    for name, content in fixture_texts().items():
        path = folder / name
        if isinstance(content, bytes):
            path.write_bytes(content)
        else:
            path.write_text(content, encoding="utf-8")


if __name__ == "__main__":
    write_fixtures()
