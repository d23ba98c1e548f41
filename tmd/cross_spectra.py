"""Cross-spectral matrices of modal forces: the load side of the n-mode engine.

A cross-spectral matrix S_F(f) is n x n over the modes: S_F,ij(f) is the
one-sided cross power spectral density per Hz of the generalised forces F_i
and F_j, E[F_i F_j*] in the Fourier convention X(f) = integral of
x(t) exp(-i 2 pi f t) dt. It is Hermitian (S_ij = conj(S_ji)) and positive
semi-definite at every frequency. Its real part is the co-spectrum, its
imaginary part the quadrature spectrum: S_ij = C_ij + i Q_ij.

A cross spectrum is any object with

* ``size``: the number of modes n,
* ``__call__(frequency_hz) -> array`` of shape ``frequency_hz.shape + (n, n)``,
  complex, zero outside the support,
* ``f_min_hz``, ``f_max_hz``: the support (0 and ``inf`` are allowed),

and optionally ``breakpoints_hz``: frequencies where an entry may not be
smooth (a table's rows). The engine makes the sharp ones panel edges of its
grid, as the one-mode engine does (:func:`tmd.modal_response.load_breakpoints`).

Where no cross-spectrum is given the modal forces are taken as uncorrelated
(:class:`UncorrelatedForces`), an assumption a result must state: torsional
and across-wind loads are in fact often correlated with each other.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Protocol, runtime_checkable

import numpy as np

from tmd.spectra import ForceSpectrum

# Relative tolerance on Hermitian symmetry and on negative eigenvalues of a
# cross-spectral matrix: tables are printed to ~10 digits, so rounding alone
# can leave a smallest eigenvalue of about -1e-10 of the largest.
HERMITIAN_RTOL = 1e-8


@runtime_checkable
class CrossSpectrum(Protocol):
    """What the n-mode engine needs of a modal force cross-spectral matrix."""

    size: int
    f_min_hz: float
    f_max_hz: float

    def __call__(self, frequency_hz: np.ndarray) -> np.ndarray:
        """Evaluate the one-sided cross-spectral matrix S_F(f), shape f.shape + (n, n)."""


@dataclass(frozen=True)
class UncorrelatedForces:
    """Modal forces with no correlation between modes: a diagonal S_F.

    Parameters
    ----------
    spectra : tuple of ForceSpectrum
        One one-sided modal force PSD per mode [N^2/Hz, or (N m)^2/Hz for a
        torsional mode].

    Notes
    -----
    The support is the union of the spectra's supports; each diagonal entry
    is zero outside its own spectrum's support.
    """

    spectra: tuple[ForceSpectrum, ...]

    @property
    def size(self) -> int:
        """Number of modes n."""
        return len(self.spectra)

    @property
    def f_min_hz(self) -> float:
        """Lowest frequency of any spectrum's support [Hz]."""
        return float(min(s.f_min_hz for s in self.spectra))

    @property
    def f_max_hz(self) -> float:
        """Highest frequency of any spectrum's support [Hz]."""
        return float(max(s.f_max_hz for s in self.spectra))

    @property
    def breakpoints_hz(self) -> tuple[float, ...]:
        """Every spectrum's breakpoints, merged and sorted [Hz]."""
        points = sorted({float(f) for s in self.spectra
                         for f in getattr(s, "breakpoints_hz", ())})
        return tuple(points)

    def diagonal(self, frequency_hz: np.ndarray) -> np.ndarray:
        """Return the diagonal S_F,ii(f), shape ``frequency_hz.shape + (n,)`` [N^2/Hz].

        Parameters
        ----------
        frequency_hz : array
            Where to evaluate [Hz].

        Returns
        -------
        array, real
        """
        f = np.asarray(frequency_hz, dtype=float)
        return np.stack([np.asarray(s(f), dtype=float) * np.ones_like(f) for s in self.spectra],
                        axis=-1)

    def __call__(self, frequency_hz):
        """Return the matrix S_F(f), shape ``frequency_hz.shape + (n, n)``, complex [N^2/Hz].

        Parameters
        ----------
        frequency_hz : array
            Where to evaluate [Hz].

        Returns
        -------
        array, complex
        """
        d = self.diagonal(frequency_hz)
        out = np.zeros(d.shape + (d.shape[-1],), dtype=complex)
        idx = np.arange(d.shape[-1])
        out[..., idx, idx] = d
        return out


@dataclass(frozen=True)
class TabulatedCrossSpectrum:
    """A cross-spectral matrix given at tabulated frequencies.

    Every entry is interpolated linearly in frequency between the table's
    rows, and is zero outside the table's range; the diagonal is interpolated
    in log-log like :class:`tmd.spectra.TabulatedSpectrum` (a power law on
    each interval), the off-diagonal co- and quadrature spectra linearly as
    fractions of sqrt(S_ii S_jj) (the coherence stays bounded by one, so the
    interpolated matrix is as positive semi-definite as its rows).

    Parameters
    ----------
    frequency_hz : array, shape (F,)
        Strictly increasing, positive frequencies [Hz].
    matrix : array, shape (F, n, n), complex
        S_F at each frequency [N^2/Hz]; Hermitian, positive semi-definite,
        positive diagonal, or a mode's row zero throughout (see
        :func:`cross_spectrum_problem`).
    source : str
        Where the table came from (shown in results).
    """

    frequency_hz: np.ndarray
    matrix: np.ndarray
    source: str = ""
    _log_f: np.ndarray = field(init=False, repr=False, compare=False)
    _log_d: np.ndarray = field(init=False, repr=False, compare=False)
    _active: np.ndarray = field(init=False, repr=False, compare=False)
    _coherency: np.ndarray = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        f = np.asarray(self.frequency_hz, dtype=float)
        s = np.asarray(self.matrix, dtype=complex)
        problem = cross_spectrum_problem(f, s)
        if problem:
            raise ValueError(problem)
        d = np.real(np.diagonal(s, axis1=-2, axis2=-1))
        active = np.all(d > 0, axis=0)  # a mode with no force at all has d = 0 throughout
        safe = np.where(active, d, 1.0)
        root = np.sqrt(safe)
        coherency = s / (root[:, :, None] * root[:, None, :])
        coherency = coherency * (active[:, None] & active[None, :])
        object.__setattr__(self, "frequency_hz", f)
        object.__setattr__(self, "matrix", s)
        object.__setattr__(self, "_log_f", np.log(f))
        object.__setattr__(self, "_log_d", np.log(safe))
        object.__setattr__(self, "_active", active)
        object.__setattr__(self, "_coherency", coherency)

    @property
    def size(self) -> int:
        """Number of modes n."""
        return self.matrix.shape[-1]

    @property
    def f_min_hz(self) -> float:
        """First tabulated frequency [Hz]."""
        return float(self.frequency_hz[0])

    @property
    def f_max_hz(self) -> float:
        """Last tabulated frequency [Hz]."""
        return float(self.frequency_hz[-1])

    @property
    def breakpoints_hz(self) -> tuple[float, ...]:
        """The table's rows: every entry is interpolated between them [Hz]."""
        return tuple(self.frequency_hz.tolist())

    def __call__(self, frequency_hz):
        """Return the matrix S_F(f), shape ``frequency_hz.shape + (n, n)``, complex [N^2/Hz].

        Parameters
        ----------
        frequency_hz : array
            Where to evaluate [Hz].

        Returns
        -------
        array, complex
        """
        f = np.asarray(frequency_hz, dtype=float)
        inside = (f >= self.f_min_hz) & (f <= self.f_max_hz)
        fc = np.where(inside, f, self.f_min_hz)
        n = self.size
        logf = np.log(fc)
        d = np.stack([np.exp(np.interp(logf, self._log_f, self._log_d[:, i])) * self._active[i]
                      for i in range(n)], axis=-1)
        coh = np.empty(f.shape + (n, n), dtype=complex)
        for i in range(n):
            for j in range(n):
                c = self._coherency[:, i, j]
                coh[..., i, j] = np.interp(fc, self.frequency_hz, c.real) + 1j * np.interp(
                    fc, self.frequency_hz, c.imag)
        root = np.sqrt(d)
        out = coh * root[..., :, None] * root[..., None, :]
        return np.where(inside[..., None, None], out, 0.0)


def cross_spectrum_problem(frequency_hz: np.ndarray, matrix: np.ndarray) -> str:
    """Describe what is wrong with a tabulated cross-spectral matrix, or return ''.

    Parameters
    ----------
    frequency_hz : array, shape (F,)
        Table frequencies [Hz].
    matrix : array, shape (F, n, n), complex
        S_F at each frequency [N^2/Hz].

    Returns
    -------
    str
        The first problem found, naming the frequency where the matrix is
        not Hermitian or not positive semi-definite; '' when there is none.

    Notes
    -----
    Hermitian: max |S - S^H| <= 1e-8 max|S|. Positive semi-definite: the
    smallest eigenvalue of (S + S^H) / 2 >= -1e-8 times the largest.
    """
    f = np.asarray(frequency_hz, dtype=float)
    s = np.asarray(matrix, dtype=complex)
    if f.ndim != 1 or s.ndim != 3 or s.shape[0] != f.size or s.shape[1] != s.shape[2]:
        return "the table needs one n x n matrix per frequency"
    if f.size < 2:
        return "the table needs at least two frequencies"
    if not np.all(np.isfinite(f)) or np.any(f <= 0):
        bad = int(np.flatnonzero(~(np.isfinite(f) & (f > 0)))[0])
        return f"frequency_hz = {float(f[bad])!r}; must be finite and > 0"
    steps = np.diff(f)
    if np.any(steps <= 0):
        bad = int(np.flatnonzero(steps <= 0)[0]) + 1
        return (f"frequency_hz = {float(f[bad])!r} does not exceed the one before "
                f"({float(f[bad - 1])!r}); frequencies must be strictly increasing")
    if not np.all(np.isfinite(s)):
        bad = int(np.flatnonzero(~np.all(np.isfinite(s), axis=(1, 2)))[0])
        return f"at {f[bad]:g} Hz the matrix has a value that is not finite"
    diag = np.real(np.diagonal(s, axis1=1, axis2=2))
    idle = np.all(diag == 0, axis=0)  # a mode with no force at all
    bad_diag = (diag <= 0) & ~idle
    if np.any(bad_diag):
        k, i = (int(v[0]) for v in np.nonzero(bad_diag))
        return (f"at {f[k]:g} Hz the auto-spectrum of mode {i + 1} is {diag[k, i]!r}; "
                "auto-spectra must be > 0 (or zero at every frequency)")
    scale = np.max(np.abs(s), axis=(1, 2))
    asym = np.max(np.abs(s - np.conj(np.swapaxes(s, 1, 2))), axis=(1, 2))
    if np.any(asym > HERMITIAN_RTOL * scale):
        k = int(np.flatnonzero(asym > HERMITIAN_RTOL * scale)[0])
        return (f"at {f[k]:g} Hz the matrix is not Hermitian (S_ij must equal conj(S_ji); "
                f"largest difference {asym[k]:.4g})")
    eig = np.linalg.eigvalsh(0.5 * (s + np.conj(np.swapaxes(s, 1, 2))))
    bad = eig[:, 0] < -HERMITIAN_RTOL * eig[:, -1]
    if np.any(bad):
        k = int(np.flatnonzero(bad)[0])
        return (f"at {f[k]:g} Hz the matrix is not positive semi-definite (smallest eigenvalue "
                f"{eig[k, 0]:.4g}); a coherence |S_ij|^2 / (S_ii S_jj) above 1 is impossible")
    return ""
