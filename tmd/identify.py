"""Identifying the built structure's mode from an ambient acceleration record.

A commissioning engineer measures the tower's acceleration under ambient wind
with the damper locked, and needs the mode's frequency and damping ratio to
re-tune the damper (:mod:`tmd.retune`). Two published methods are run on the
same record and their spread is reported:

* **Frequency-domain maximum likelihood** (:func:`spectral_fit`): the
  acceleration spectrum of a modal oscillator under a locally white force,
  plus a flat background, fitted to the record's periodogram by Whittle's
  likelihood. This is the single-mode form of Au's fast Bayesian FFT method
  (its most probable value): the periodogram ordinates near resonance are
  independent and exponentially distributed about the spectrum. Its random
  error is close to the least possible for the record length (Au's
  uncertainty law), so it gives the reported values.
* **Random decrement** (:func:`random_decrement`, Cole 1973): the record,
  band-passed around the mode, is averaged over segments starting where it
  crosses a trigger level; for a Gaussian response the average is
  proportional to the correlation function, a free decay whose frequency
  and damping are fitted by least squares. It is independent of the
  spectral route and serves as its check.

The identified damping ratio is the **total** damping of the mode at the
record's wind (structural + aerodynamic), with the damper locked.

References
----------
Whittle, P. (1953). Estimation and information in stationary time series.
Arkiv för Matematik 2, 423-434.
Au, S. K. (2011). Fast Bayesian FFT method for ambient modal identification
with separated modes. Journal of Engineering Mechanics 137(3), 214-226.
Au, S. K. (2014). Uncertainty law in ambient modal identification - Part I:
Theory. Mechanical Systems and Signal Processing 48, 15-33 (from memory: for a
long record and a wide band, c.o.v. of zeta ~ 1 / sqrt(2 pi zeta f T) and of f
~ sqrt(zeta / (2 pi f T))).
Cole, H. A. (1973). On-line failure detection and damping measurement of
aerospace structures by random decrement signatures. NASA CR-2205.
Asmussen, J. C. (1997). Modal analysis based on the random decrement
technique. PhD thesis, Aalborg University (trigger levels; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import optimize

from tmd.ambient_record import (  # noqa: F401  (re-exported: the record is identify's input)
    AccelerationRecord,
    RecordError,
    read_acceleration_record,
    record_from_samples,
)

# Short-record rule: warn when Au's law predicts a damping c.o.v. above this.
SHORT_RECORD_DAMPING_COV = 0.20
# Half-width of the spectral fit band: FIT_BAND_ZETAS damping bandwidths zeta f,
# at most FIT_BAND_MAX_FRACTION of f (a wide band approaches Au's wide-band law).
FIT_BAND_ZETAS = 20.0
FIT_BAND_MAX_FRACTION = 0.3
SPREAD_WARNING_COVS = 4.0  # warn when the methods differ by more than 4 delta_zeta
RD_BAND = (0.6, 1.4)  # random decrement band-pass, as factors of the mode's frequency
RD_FIT_DECAY = 0.5  # fit the signature until its envelope has fallen by exp(-0.5)


@dataclass(frozen=True)
class ModalEstimate:
    """One method's estimate of the mode.

    Parameters
    ----------
    method : str
        The method's name.
    frequency_hz : float
        Natural frequency [Hz].
    damping_ratio : float
        Total damping ratio [-].
    """

    method: str
    frequency_hz: float
    damping_ratio: float


@dataclass(frozen=True)
class Identification:
    """The mode identified from a record by both methods.

    Parameters
    ----------
    frequency_hz, damping_ratio : float
        Reported values (the spectral maximum-likelihood fit) [Hz], [-].
    methods : tuple of ModalEstimate
        Every method's estimate.
    frequency_spread, damping_spread : float
        (largest - smallest) / reported value over the methods [-].
    predicted_damping_cov, predicted_frequency_cov : float
        Au's law for the record's length at the identified values [-].
    duration_s : float
        Record length [s].
    warnings : tuple of str
        Plain-language cautions about the identification (short record, methods
        that disagree, a fit at the edge of its range), one sentence each.
    """

    frequency_hz: float
    damping_ratio: float
    methods: tuple[ModalEstimate, ...]
    frequency_spread: float
    damping_spread: float
    predicted_damping_cov: float
    predicted_frequency_cov: float
    duration_s: float
    warnings: tuple[str, ...] = ()

    def as_dict(self) -> dict:
        """Return the ``tmd identify --json`` dictionary.

        Returns
        -------
        dict
            ``frequency_hz``, ``damping_ratio``, ``methods`` [{method,
            frequency_hz, damping_ratio}], spreads, predicted c.o.v.s,
            ``duration_s``, ``warnings`` and ``damping_note``.
        """
        return {
            "frequency_hz": self.frequency_hz, "damping_ratio": self.damping_ratio,
            "methods": [{"method": m.method, "frequency_hz": m.frequency_hz,
                         "damping_ratio": m.damping_ratio} for m in self.methods],
            "frequency_spread": self.frequency_spread, "damping_spread": self.damping_spread,
            "predicted_damping_cov": self.predicted_damping_cov,
            "predicted_frequency_cov": self.predicted_frequency_cov,
            "duration_s": self.duration_s, "warnings": list(self.warnings),
            "damping_note": DAMPING_NOTE,
        }


DAMPING_NOTE = (
    "The identified damping ratio is the total damping of the mode at the record's wind "
    "(structural + aerodynamic), measured with the damper locked. Given to 'tmd retune' as "
    "--measured-damping-ratio it replaces the case's [mode] damping_ratio; the case's "
    "aerodynamic damping is then added once, at the design wind. The record's own "
    "aerodynamic part is taken as negligible (ambient wind well below the design wind); for a "
    "record taken in strong wind, subtract it (EN 1991-1-4 F.18 at the record's mean speed) "
    "before giving the ratio, or the aerodynamic damping is counted twice.")


# --- the laws ----------------------------------------------------------------

def damping_random_error(damping_ratio, frequency_hz, duration_s):
    """Au's law for the c.o.v. of an identified damping ratio (long record, wide band).

    Parameters
    ----------
    damping_ratio : float or array
        zeta [-].
    frequency_hz : float or array
        f [Hz].
    duration_s : float or array
        Record length T [s].

    Returns
    -------
    array
        delta_zeta = 1 / sqrt(2 pi zeta f T) [-].

    References
    ----------
    Au (2014), Part I (module references; from memory).
    """
    return 1.0 / np.sqrt(2.0 * np.pi * np.asarray(damping_ratio) * np.asarray(frequency_hz)
                         * np.asarray(duration_s))


def frequency_random_error(damping_ratio, frequency_hz, duration_s):
    """Au's law for the c.o.v. of an identified natural frequency (long record, wide band).

    Parameters
    ----------
    damping_ratio : float or array
        zeta [-].
    frequency_hz : float or array
        f [Hz].
    duration_s : float or array
        Record length T [s].

    Returns
    -------
    array
        delta_f = sqrt(zeta / (2 pi f T)) [-].

    References
    ----------
    Au (2014), Part I (module references; from memory).
    """
    return np.sqrt(np.asarray(damping_ratio) / (2.0 * np.pi * np.asarray(frequency_hz)
                                                * np.asarray(duration_s)))


# --- method 1: spectral maximum likelihood ------------------------------------

def periodogram(record: AccelerationRecord) -> tuple[np.ndarray, np.ndarray]:
    """One-sided periodogram of the whole (mean-removed) record.

    Parameters
    ----------
    record : AccelerationRecord
        Ambient acceleration of the building [m/s^2], evenly sampled.

    Returns
    -------
    (frequency_hz, psd)
        Frequencies k / T (0 and Nyquist left out) [Hz] and
        P_k = 2 |dt sum a_n exp(-2 pi i k n / N)|^2 / T [(m/s^2)^2/Hz], whose
        expectation is the one-sided PSD at f_k for a long record.
    """
    a = record.acceleration_m_s2
    dt = record.time_step_s
    spectrum = np.fft.rfft(a - a.mean()) * dt
    f = np.fft.rfftfreq(a.size, dt)
    p = 2.0 * np.abs(spectrum) ** 2 / record.duration_s
    return f[1:-1], p[1:-1]


def _oscillator_shape(f, fn, zeta):
    """f^4 / ((fn^2 - f^2)^2 + (2 zeta fn f)^2): a modal oscillator's |acceleration / force|^2."""
    return f**4 / ((fn * fn - f * f) ** 2 + (2.0 * zeta * fn * f) ** 2)


def _whittle(theta, f, p):
    """Whittle's negative log-likelihood and its gradient in (ln fn, ln zeta, ln A, ln N)."""
    fn, zeta, amp, noise = np.exp(theta)
    den = (fn * fn - f * f) ** 2 + (2.0 * zeta * fn * f) ** 2
    g = f**4 / den
    s = amp * g + noise
    value = np.sum(np.log(s) + p / s)
    w = 1.0 / s - p / (s * s)
    d_den_fn = (4.0 * fn * (fn * fn - f * f) + 8.0 * zeta**2 * fn * f * f) * fn
    d_den_zeta = 8.0 * zeta**2 * fn * fn * f * f
    grad = np.array([
        np.sum(w * -amp * g / den * d_den_fn),
        np.sum(w * -amp * g / den * d_den_zeta),
        np.sum(w * amp * g),
        np.sum(w * noise),
    ])
    return value, grad


def spectral_fit(record: AccelerationRecord, frequency_hz_guess: float, *,
                 damping_ratio_guess: float = 0.02) -> ModalEstimate:
    """Frequency and damping by a maximum-likelihood fit to the record's periodogram.

    Parameters
    ----------
    record : AccelerationRecord
        Ambient acceleration of the building [m/s^2], evenly sampled.
    frequency_hz_guess : float
        A first estimate of the mode's frequency (e.g. the Welch peak) [Hz].
    damping_ratio_guess : float
        A first estimate of its damping ratio [-].

    Returns
    -------
    ModalEstimate

    Notes
    -----
    Model: S(f) = A f^4 / ((fn^2 - f^2)^2 + (2 zeta fn f)^2) + N, a modal
    oscillator's acceleration under a force flat across the band, plus a
    flat background N. Whittle's negative log-likelihood
    sum_k [ln S(f_k) + P_k / S(f_k)] over the band
    fn (1 +/- min(20 zeta, 0.3)) is minimised (BFGS, analytic gradient)
    in the logarithms of the four parameters; the band is re-centred on the
    first fit and fitted again.

    References
    ----------
    Whittle (1953); Au (2011) (module references).
    """
    f, p = periodogram(record)
    fn, zeta = float(frequency_hz_guess), float(damping_ratio_guess)
    for _ in range(2):
        half = min(FIT_BAND_ZETAS * zeta, FIT_BAND_MAX_FRACTION) * fn
        band = (f > fn - half) & (f < fn + half)
        if np.count_nonzero(band) < 8:
            raise RecordError(f"{record.source}: only {np.count_nonzero(band)} spectral lines "
                              f"lie within ±{half:.3g} Hz of {fn:.4g} Hz; the record is too "
                              "short to resolve the mode")
        fb, pb = f[band], p[band]
        shape = _oscillator_shape(fb, fn, zeta)
        noise0 = max(float(np.percentile(pb, 10)), 1e-30)
        amp0 = max(float(np.mean(pb)) - noise0, 1e-30) / float(np.mean(shape))
        scale = float(np.mean(pb))
        theta0 = np.log([fn, zeta, amp0 / scale, max(noise0, 1e-9 * scale) / scale])
        res = optimize.minimize(_whittle, theta0, args=(fb, pb / scale), jac=True,
                                method="BFGS",
                                options={"gtol": 1e-8, "maxiter": 500})
        if not np.all(np.isfinite(res.x)):
            raise ArithmeticError(f"{record.source}: the spectral fit did not converge")
        fn, zeta = float(math.exp(res.x[0])), float(math.exp(res.x[1]))
    return ModalEstimate("spectral maximum likelihood (Whittle; Au's Bayesian FFT, one mode)",
                         fn, zeta)


# --- method 2: random decrement -----------------------------------------------

def random_decrement_signature(record: AccelerationRecord, frequency_hz_guess: float, *,
                               length_s: float | None = None) -> tuple[np.ndarray, np.ndarray, int]:
    """Return the random decrement signature of the band-passed record.

    Parameters
    ----------
    record : AccelerationRecord
        Ambient acceleration of the building [m/s^2], evenly sampled.
    frequency_hz_guess : float
        The mode's frequency, centre of the band-pass [Hz].
    length_s : float, optional
        Signature length [s]; 60 periods by default.

    Returns
    -------
    (lag_s, signature, triggers)
        Lags [s], the signature normalised by the trigger level [-], and the
        number of triggers averaged.

    Notes
    -----
    Zero-phase 4th-order Butterworth band-pass over f (0.6 .. 1.4); triggers
    where the filtered record y crosses +sigma_y (either slope) and, with
    the sign reversed, -sigma_y; the signature is the mean of the segments
    that follow, found for every lag at once by FFT correlation.
    """
    from scipy import signal  # deferred: 0.4 s to import, and only identification needs it

    dt = record.time_step_s
    f0 = frequency_hz_guess
    nyquist = 0.5 / dt
    if not RD_BAND[1] * f0 < nyquist:
        raise RecordError(f"{record.source}: the mode at {f0:.4g} Hz is too close to the "
                          f"Nyquist frequency {nyquist:.4g} Hz")
    sos = signal.butter(4, [RD_BAND[0] * f0, RD_BAND[1] * f0], btype="bandpass", fs=1.0 / dt,
                        output="sos")
    a = record.acceleration_m_s2
    y = signal.sosfiltfilt(sos, a - a.mean())
    level = float(np.std(y))
    n_lags = int(round((length_s if length_s is not None else 60.0 / f0) / dt))
    n_lags = min(n_lags, y.size // 4)
    usable = y.size - n_lags
    weights = np.zeros(y.size)
    count = 0
    for lev, sign in ((level, 1.0), (-level, -1.0)):
        crossing = np.nonzero((y[:usable - 1] - lev) * (y[1:usable] - lev) < 0.0)[0]
        nearer = np.where(np.abs(y[crossing] - lev) <= np.abs(y[crossing + 1] - lev),
                          crossing, crossing + 1)
        np.add.at(weights, nearer, sign)
        count += nearer.size
    if count < 10:
        raise RecordError(f"{record.source}: only {count} random decrement triggers; the "
                          "record is too short")
    # sum_n w_n y_{n+j} for every lag j: a correlation, done by FFT.
    corr = signal.fftconvolve(y, weights[::-1], mode="full")[y.size - 1:y.size - 1 + n_lags]
    return np.arange(n_lags) * dt, corr / count / level, count


def random_decrement(record: AccelerationRecord, frequency_hz_guess: float) -> ModalEstimate:
    """Frequency and damping from a fit of a free decay to the random decrement signature.

    Parameters
    ----------
    record : AccelerationRecord
        Ambient acceleration of the building [m/s^2], evenly sampled.
    frequency_hz_guess : float
        A first estimate of the mode's frequency [Hz].

    Returns
    -------
    ModalEstimate

    Notes
    -----
    D(tau) = exp(-zeta omega_n tau) (A cos omega_d tau + B sin omega_d tau),
    omega_d = omega_n sqrt(1 - zeta^2), fitted by least squares
    (``scipy.optimize.least_squares``) from one period (past the band-pass
    filter's own transient) to where the signature's Hilbert envelope has
    fallen by exp(-0.5).

    References
    ----------
    Cole (1973); Asmussen (1997) (module references).
    """
    from scipy import signal  # deferred: 0.4 s to import, and only identification needs it

    lag, d, _ = random_decrement_signature(record, frequency_hz_guess)
    dt = record.time_step_s
    envelope = np.abs(signal.hilbert(d))
    i0 = int(round(1.0 / frequency_hz_guess / dt))
    below = np.nonzero(envelope[i0:] < math.exp(-RD_FIT_DECAY) * envelope[i0])[0]
    i1 = i0 + (int(below[0]) if below.size else lag.size - i0 - 1)
    i1 = max(i1, i0 + int(round(2.0 / frequency_hz_guess / dt)))  # at least two periods
    t, y = lag[i0:i1], d[i0:i1]
    if t.size < 8:
        raise RecordError(f"{record.source}: the random decrement signature is too short")
    # A first damping estimate from the envelope's log-slope over the window.
    slope = np.polyfit(t, np.log(np.maximum(envelope[i0:i1], 1e-300)), 1)[0]
    zeta0 = float(np.clip(-slope / (2 * math.pi * frequency_hz_guess), 1e-3, 0.3))

    def residual(x):
        fd, zeta, amp_c, amp_s = x
        wd = 2 * math.pi * fd
        wn = wd / math.sqrt(1.0 - zeta * zeta)
        return np.exp(-zeta * wn * t) * (amp_c * np.cos(wd * t) + amp_s * np.sin(wd * t)) - y

    res = optimize.least_squares(residual, [frequency_hz_guess, zeta0, 1.0, 0.0],
                                 bounds=([0.5 * frequency_hz_guess, 1e-5, -np.inf, -np.inf],
                                         [1.5 * frequency_hz_guess, 0.9, np.inf, np.inf]),
                                 x_scale=[0.01 * frequency_hz_guess, 0.01, 1.0, 1.0],
                                 xtol=1e-12, ftol=1e-12)
    fd, zeta = float(res.x[0]), float(res.x[1])
    return ModalEstimate("random decrement (Cole), free-decay fit", fd / math.sqrt(1 - zeta**2),
                         zeta)


# --- both ----------------------------------------------------------------------

def welch_peak_hz(record: AccelerationRecord, min_frequency_hz: float | None = None,
                  max_frequency_hz: float | None = None) -> float:
    """Frequency of the largest Welch PSD ordinate in a search range [Hz].

    Parameters
    ----------
    record : AccelerationRecord
        Ambient acceleration of the building [m/s^2], evenly sampled.
    min_frequency_hz, max_frequency_hz : float, optional
        Search range [Hz]; by default from 20 / T to a quarter of the
        sampling rate.

    Returns
    -------
    float
        The peak's frequency, refined by a parabola through the three
        largest neighbouring ordinates [Hz].

    Notes
    -----
    Welch's method (``scipy.signal.welch``, Hann window, 50% overlap) with
    segments of about an eighth of the record.
    """
    from scipy import signal  # deferred: 0.4 s to import, and only identification needs it

    a, dt, T = record.acceleration_m_s2, record.time_step_s, record.duration_s
    lo = 20.0 / T if min_frequency_hz is None else min_frequency_hz
    hi = 0.25 / dt if max_frequency_hz is None else max_frequency_hz
    if not 0 <= lo < hi:
        raise RecordError(f"{record.source}: search range {lo:g} .. {hi:g} Hz is empty")
    nperseg = 2 ** int(math.floor(math.log2(a.size / 8)))
    f, p = signal.welch(a - a.mean(), fs=1.0 / dt, nperseg=nperseg)
    inside = np.nonzero((f >= lo) & (f <= hi))[0]
    if inside.size < 3:
        raise RecordError(f"{record.source}: fewer than 3 spectral lines between {lo:g} and "
                          f"{hi:g} Hz; give a wider range or a longer record")
    k = inside[np.argmax(p[inside])]
    if 0 < k < f.size - 1:
        y0, y1, y2 = np.log(p[k - 1:k + 2])
        denom = y0 - 2 * y1 + y2
        shift = 0.5 * (y0 - y2) / denom if denom < 0 else 0.0
        return float(f[k] + np.clip(shift, -0.5, 0.5) * (f[1] - f[0]))
    return float(f[k])


def identify_mode(record: AccelerationRecord, *, min_frequency_hz: float | None = None,
                  max_frequency_hz: float | None = None) -> Identification:
    """Return the mode's frequency and total damping ratio by both methods, with their spread.

    Parameters
    ----------
    record : AccelerationRecord
        Ambient acceleration [m/s^2] with the damper locked, evenly sampled.
    min_frequency_hz, max_frequency_hz : float, optional
        Where to look for the mode [Hz] (see :func:`welch_peak_hz`).

    Returns
    -------
    Identification
        Reported values from :func:`spectral_fit`; the short-record warning
        when Au's law predicts a damping c.o.v. above 20% for this record
        length.
    """
    f0 = welch_peak_hz(record, min_frequency_hz, max_frequency_hz)
    rd = random_decrement(record, f0)
    ml = spectral_fit(record, rd.frequency_hz, damping_ratio_guess=float(
        np.clip(rd.damping_ratio, 2e-3, 0.1)))
    methods = (ml, rd)
    freqs = np.array([m.frequency_hz for m in methods])
    zetas = np.array([m.damping_ratio for m in methods])
    T = record.duration_s
    cov_zeta = float(damping_random_error(ml.damping_ratio, ml.frequency_hz, T))
    cov_f = float(frequency_random_error(ml.damping_ratio, ml.frequency_hz, T))
    notes = []
    if cov_zeta > SHORT_RECORD_DAMPING_COV:
        needed = T * (cov_zeta / SHORT_RECORD_DAMPING_COV) ** 2
        notes.append(
            f"the record ({T:.0f} s) is short for a damping estimate: Au's uncertainty law "
            f"1/sqrt(2 pi zeta f T) gives a coefficient of variation of {100 * cov_zeta:.0f}% "
            f"(rule: warn above {100 * SHORT_RECORD_DAMPING_COV:.0f}%); about {needed:.0f} s "
            "would bring it to that")
    spread_z = float((zetas.max() - zetas.min()) / ml.damping_ratio)
    # The difference of the two estimates has a standard deviation of about
    # 2 delta_zeta (random decrement scatters ~1.6x Au's law, measured in the
    # tests); 4 delta_zeta is about two of them.
    if spread_z > SPREAD_WARNING_COVS * cov_zeta:
        notes.append(f"the two methods' damping ratios differ by {100 * spread_z:.0f}%, more "
                     "than their expected random error: check the record (other modes, "
                     "non-stationary wind, sensor noise)")
    return Identification(ml.frequency_hz, ml.damping_ratio, methods,
                          float((freqs.max() - freqs.min()) / ml.frequency_hz), spread_z,
                          cov_zeta, cov_f, T, tuple(notes))
