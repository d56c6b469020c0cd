"""Kinetic theory of dilute gases: collision integrals, pure-species viscosity and conductivity, diffusion.

Chapman-Enskog theory with the Lennard-Jones (12-6) potential, as set out in Hirschfelder,
Curtiss & Bird, *Molecular Theory of Gases and Liquids* (1954) and Poling, Prausnitz &
O'Connell, *The Properties of Gases and Liquids*, 5th ed. (2001), chapters 9-11:

* reduced collision integrals Omega(2,2)* and Omega(1,1)* from the correlations of Neufeld,
  Janzen & Aziz, J. Chem. Phys. 57 (1972) 1100, with Brokaw's correction for polar molecules
  (Brokaw, Ind. Eng. Chem. Process Des. Dev. 8 (1969) 240; Poling et al. eqs. 9-4.3 and 11-3.8):
  + 0.2 delta*^2 / T* (viscosity) and + 0.19 delta*^2 / T* (diffusion);
* pure-species thermal conductivity from the viscosity and the heat capacity with the
  translational, rotational and vibrational parts weighted as in Warnatz (1982), in the form
  of Kee, Coltrin & Glarborg, *Chemically Reacting Flow* (2003), section 12.3 (the rotational
  relaxation number scaled with the Parker (1959) temperature function).

Everything is vectorised over species (numpy arrays); SI units: diameters [m], well depths as
epsilon/k [K], dipole moments [C m], molar masses [kg/kmol], temperatures [K], pressures [Pa].
"""

from __future__ import annotations

import numpy as np
from scipy import constants as _sc

from perfchain.constants import R_UNIVERSAL

__all__ = ["omega22", "omega11", "reduced_dipole", "viscosity_pure", "conductivity_pure",
           "binary_diffusion", "wilke_phi"]

_KB = _sc.k                      # [J/K]
_NA = _sc.N_A * 1e3              # [1/kmol]
_EPS0 = _sc.epsilon_0            # [F/m]
_PI15 = np.pi ** 1.5


def omega22(tstar, delta=0.0):
    """Reduced collision integral Omega(2,2)* of the Lennard-Jones potential [-].

    Neufeld, Janzen & Aziz (1972) correlation (within 0.1 % of the tabulated integrals for
    0.3 <= T* <= 100), plus Brokaw's polar term 0.2 delta*^2 / T* (Poling et al. 2001, eq. 9-4.3).

    Parameters
    ----------
    tstar : float or array
        Reduced temperature k T / epsilon [-].
    delta : float or array
        Reduced dipole moment (see :func:`reduced_dipole`) [-].

    Examples
    --------
    Bird, Stewart & Lightfoot, *Transport Phenomena*, 2nd ed. (2002), Table E.2 lists
    1.593 at T* = 1.0 (from memory):

    >>> round(float(omega22(1.0)), 3)
    1.593
    """
    t = np.asarray(tstar, dtype=float)
    om = 1.16145 * t ** -0.14874 + 0.52487 * np.exp(-0.77320 * t) + 2.16178 * np.exp(-2.43787 * t)
    return om + 0.2 * np.asarray(delta, dtype=float) ** 2 / t


def omega11(tstar, delta=0.0):
    """Reduced collision integral Omega(1,1)* (diffusion) of the Lennard-Jones potential [-].

    Neufeld, Janzen & Aziz (1972) correlation, plus Brokaw's polar term 0.19 delta*^2 / T*
    (Poling et al. 2001, eq. 11-3.8).

    Parameters
    ----------
    tstar : float or array
        Reduced temperature k T / epsilon [-].
    delta : float or array
        Reduced dipole moment [-].

    Examples
    --------
    Bird, Stewart & Lightfoot (2002), Table E.2 lists 1.440 at T* = 1.0 (from memory):

    >>> round(float(omega11(1.0)), 3)
    1.44
    """
    t = np.asarray(tstar, dtype=float)
    om = (1.06036 * t ** -0.15610 + 0.19300 * np.exp(-0.47635 * t)
          + 1.03587 * np.exp(-1.52996 * t) + 1.76474 * np.exp(-3.89411 * t))
    return om + 0.19 * np.asarray(delta, dtype=float) ** 2 / t


def reduced_dipole(dipole, well_depth, diameter):
    """Reduced dipole moment delta* = mu^2 / (8 pi eps0 epsilon sigma^3) [-].

    Parameters
    ----------
    dipole : float or array
        Dipole moment [C m].
    well_depth : float or array
        epsilon / k [K].
    diameter : float or array
        Collision diameter sigma [m].

    Examples
    --------
    Water with the gri30 parameters (1.844 D, 572.4 K, 2.605 Angstrom):

    >>> round(float(reduced_dipole(1.844 * 3.33564e-30, 572.4, 2.605e-10)), 2)
    1.22
    """
    return (np.asarray(dipole, dtype=float) ** 2
            / (8.0 * np.pi * _EPS0 * _KB * np.asarray(well_depth) * np.asarray(diameter) ** 3))


def viscosity_pure(temperature, molar_mass, diameter, well_depth, delta=0.0):
    """Chapman-Enskog viscosity of pure gases [Pa s].

    mu = (5/16) sqrt(pi m k T) / (pi sigma^2 Omega(2,2)*) (Hirschfelder, Curtiss & Bird
    1954, eq. 8.2-18, first approximation).

    Parameters
    ----------
    temperature : float
        [K].
    molar_mass : float or array
        [kg/kmol].
    diameter : float or array
        sigma [m].
    well_depth : float or array
        epsilon / k [K].
    delta : float or array
        Reduced dipole moment [-].

    Examples
    --------
    Nitrogen at 1000 K with sigma = 3.621 A, epsilon/k = 97.53 K (gri30 data): 41.5 uPa s
    (NIST Chemistry WebBook fluid data give 41.5 uPa s at 1 bar, from memory):

    >>> round(float(viscosity_pure(1000.0, 28.014, 3.621e-10, 97.53)) * 1e6, 1)
    41.5
    """
    m = np.asarray(molar_mass, dtype=float) / _NA
    sig = np.asarray(diameter, dtype=float)
    tstar = temperature / np.asarray(well_depth, dtype=float)
    return 5.0 / 16.0 * np.sqrt(np.pi * m * _KB * temperature) / (
        np.pi * sig ** 2 * omega22(tstar, delta))


def _parker(eps_over_kt):
    """Parker's temperature function of the rotational relaxation number (Kee et al. eq. 12.105)."""
    r = np.sqrt(eps_over_kt)
    return 1.0 + 0.5 * _PI15 * r + (0.25 * np.pi ** 2 + 2.0) * eps_over_kt + _PI15 * r ** 3


def conductivity_pure(temperature, molar_mass, viscosity, cv_molar, cv_rot, rot_relaxation,
                      well_depth, delta=0.0):
    """Thermal conductivity of pure gases from viscosity and heat capacity [W/(m K)].

    lambda = (mu / M) (f_tr cv_tr + f_rot cv_rot + f_vib cv_vib) with the Warnatz (1982)
    weights (Kee, Coltrin & Glarborg 2003, eqs. 12.99-12.105): f_vib = rho D_kk / mu =
    (6/5) Omega(2,2)*/Omega(1,1)*, and f_tr, f_rot corrected for the coupling of rotation and
    translation through the rotational relaxation number Z_rot(298 K) F(298 K) / F(T).

    Parameters
    ----------
    temperature : float
        [K].
    molar_mass, viscosity : array
        [kg/kmol], [Pa s].
    cv_molar : array
        Molar heat capacity at constant volume [J/(kmol K)].
    cv_rot : array
        Rotational heat capacity over R: 0 (atom), 1 (linear), 1.5 (nonlinear) [-].
    rot_relaxation : array
        Rotational relaxation number at 298 K [-].
    well_depth : array
        epsilon / k [K].
    delta : array
        Reduced dipole moment [-].

    Examples
    --------
    A monatomic gas has lambda = (15/4) (R/M) mu (closed form; Hirschfelder et al. eq. 8.2-31):

    >>> lam = conductivity_pure(1000.0, 39.95, 5.0e-5, 1.5 * 8314.462618, 0.0, 0.0, 136.5)
    >>> round(float(lam / (3.75 * 8314.462618 / 39.95 * 5.0e-5)), 9)
    1.0
    """
    m = np.asarray(molar_mass, dtype=float)
    cv_rot = np.asarray(cv_rot, dtype=float)
    tstar = temperature / np.asarray(well_depth, dtype=float)
    f_int = 1.2 * omega22(tstar, delta) / omega11(tstar, delta)
    a_factor = 2.5 - f_int
    z_rot = (np.asarray(rot_relaxation, dtype=float)
             * _parker(np.asarray(well_depth) / 298.0) / _parker(1.0 / tstar))
    b_factor = z_rot + 2.0 / np.pi * (5.0 / 3.0 * cv_rot + f_int)
    c1 = 2.0 / np.pi * a_factor / b_factor
    cv_vib = np.asarray(cv_molar, dtype=float) / R_UNIVERSAL - 1.5 - cv_rot
    f_rot = f_int * (1.0 + c1)
    f_tr = 2.5 * (1.0 - c1 * cv_rot / 1.5)
    return (np.asarray(viscosity) / m * R_UNIVERSAL
            * (f_tr * 1.5 + f_rot * cv_rot + f_int * cv_vib))


def binary_diffusion(temperature, pressure, molar_mass, diameter, well_depth, delta):
    """Binary diffusion coefficients of every pair of species [m^2/s] (an n x n matrix).

    D_kl = (3/16) sqrt(2 pi (k T)^3 / m_kl) / (p pi sigma_kl^2 Omega(1,1)*) (Hirschfelder et
    al. 1954, eq. 8.2-44), with sigma_kl = (sigma_k + sigma_l)/2, epsilon_kl =
    sqrt(epsilon_k epsilon_l), delta_kl = sqrt(delta_k delta_l) and the reduced mass m_kl.

    Parameters
    ----------
    temperature, pressure : float
        [K], [Pa].
    molar_mass, diameter, well_depth, delta : array
        Per species: [kg/kmol], sigma [m], epsilon/k [K], reduced dipole [-].

    Examples
    --------
    N2-O2 at 1 atm and 293 K: 0.20 cm^2/s (Poling et al. 2001, Table 11-2 lists 0.202, from memory):

    >>> d = binary_diffusion(293.0, 101325.0, [28.014, 31.998], [3.621e-10, 3.458e-10],
    ...                      [97.53, 107.4], [0.0, 0.0])
    >>> round(float(d[0, 1]) * 1e4, 2)
    0.2
    """
    m = np.asarray(molar_mass, dtype=float) / _NA
    sig = np.asarray(diameter, dtype=float)
    eps = np.asarray(well_depth, dtype=float)
    dlt = np.asarray(delta, dtype=float)
    m_red = np.outer(m, m) / (m[:, None] + m[None, :])
    sig_kl = 0.5 * (sig[:, None] + sig[None, :])
    tstar = temperature / np.sqrt(np.outer(eps, eps))
    om = omega11(tstar, np.sqrt(np.outer(dlt, dlt)))
    return (3.0 / 16.0 * np.sqrt(2.0 * np.pi * (_KB * temperature) ** 3 / m_red)
            / (pressure * np.pi * sig_kl ** 2 * om))


def wilke_phi(viscosity, molar_mass):
    """Wilke's interaction matrix phi_ij of a gas mixture [-] (Wilke, J. Chem. Phys. 18 (1950) 517).

    phi_ij = [1 + (mu_i/mu_j)^(1/2) (M_j/M_i)^(1/4)]^2 / [8 (1 + M_i/M_j)]^(1/2).

    Parameters
    ----------
    viscosity, molar_mass : array
        Pure-species viscosities [Pa s] and molar masses [kg/kmol].

    Examples
    --------
    phi_ii = 1 for every species (closed form):

    >>> wilke_phi([2e-5, 3e-5], [2.0, 18.0]).diagonal().tolist()
    [1.0, 1.0]
    """
    mu = np.asarray(viscosity, dtype=float)
    m = np.asarray(molar_mass, dtype=float)
    return ((1.0 + np.sqrt(mu[:, None] / mu[None, :]) * (m[None, :] / m[:, None]) ** 0.25) ** 2
            / np.sqrt(8.0 * (1.0 + m[:, None] / m[None, :])))
