"""UNIFAC group-contribution activity coefficients, vectorized over stages, with analytic
derivatives.

Two methods share this code:

- :class:`UNIFAC`, the original method: A. Fredenslund, R. L. Jones and J. M. Prausnitz,
  AIChE J. 21 (1975) 1086-1099, with the parameters of Hansen et al., Ind. Eng. Chem. Res. 30
  (1991) 2352-2355, and Wittig, Lohmann & Gmehling, Ind. Eng. Chem. Res. 42 (2003) 183-188;
- :class:`DortmundUNIFAC`, modified UNIFAC (Dortmund): U. Weidlich and J. Gmehling, Ind. Eng.
  Chem. Res. 26 (1987) 1372-1381; J. Gmehling, J. Li and M. Schiller, Ind. Eng. Chem. Res. 32
  (1993) 178-193, and the later published revisions (see :mod:`solver.thermo.unifac_tables`).

With r_i = sum_k nu_ki R_k and q_i = sum_k nu_ki Q_k (nu_ki: count of subgroup k in component
i), V_i = r_i / sum_j x_j r_j, F_i = q_i / sum_j x_j q_j and V'_i = r_i^p / sum_j x_j r_j^p
(p = 1 original, p = 3/4 Dortmund):

    ln gamma_i = 1 - V'_i + ln V'_i - 5 q_i (1 - V_i/F_i + ln(V_i/F_i))          (combinatorial)
               + sum_k nu_ki (ln Gamma_k - ln Gamma_k^(i))                         (residual)
    ln Gamma_k = Q_k (1 - ln(sum_m Theta_m Psi_mk) - sum_m Theta_m Psi_km / sum_n Theta_n Psi_nm)

Theta_m = Q_m X_m / sum_n Q_n X_n are the group area fractions of the mixture (of pure i for
Gamma_k^(i)) and Psi_mn = exp(-(a_mn + b_mn T + c_mn T^2) / T) depends on the main groups of m
and n (b = c = 0 for the original method). The model is written in x / sum(x) throughout, so
d ln gamma_i / d x_k (every other x fixed) is exact off the simplex too, ln gamma is homogeneous
of degree zero, Gibbs-Duhem holds for any x, and the excess enthalpy by Gibbs-Helmholtz,
h^E = -R T^2 sum_i x_i d ln gamma_i / dT, has d h^E / d x_k = -R T^2 d ln gamma_k / dT.
A residual term of a group k summed with the weights w_k = Q_k sum_i nu_ki x_i collapses to
sum_k w_k ln Gamma_k / Q_k = -sum_k w_k ln(S_k / sum(w)), S_k = sum_m w_m Psi_mk; that is how the
pure-component terms and the second temperature derivative in d h^E / dT are evaluated.

Arrays carry the state (stage) index first; (n, g, g) group matrices are multiplied by numpy's
batched matmul, so nothing loops over states in Python.
"""

from __future__ import annotations

from typing import Mapping, Sequence

import numpy as np

from solver.errors import CaseError
from solver.fluids import loose_key
from scipy.constants import R as GAS_CONSTANT

from solver.thermo.activity_base import ActivityResult, check_states
from solver.thermo.unifac_tables import builtin_groups, builtin_source, load_tables

__all__ = ["UNIFAC", "DortmundUNIFAC"]

#: half the lattice coordination number z = 10 of the combinatorial part
HALF_COORDINATION_NUMBER = 5.0


def _counts(component: str, groups, tables, where: str) -> dict[int, int]:
    """{subgroup number: count} of one component, checked."""
    if not isinstance(groups, Mapping) or not groups:
        raise CaseError(
            f"the UNIFAC groups of {component!r} must be a table of subgroup = count",
            key=where,
            value=groups,
            expected='e.g. { CH3 = 1, CH2 = 1, OH = 1 }',
        )
    counts: dict[int, int] = {}
    for key, count in groups.items():
        subgroup = tables.subgroup(key, where=f"{where}.{key}")
        if isinstance(count, bool) or not isinstance(count, (int, float)) or count != int(count) or count < 1:
            raise CaseError(
                f"the count of subgroup {key!r} in {component!r} must be a positive whole number",
                key=f"{where}.{key}",
                value=count,
            )
        counts[subgroup.number] = counts.get(subgroup.number, 0) + int(count)
    return counts


class UNIFAC:
    """Original UNIFAC (Fredenslund, Jones & Prausnitz 1975) for given group assignments.

    ``groups`` holds one ``{subgroup: count}`` per component, a subgroup by its published name
    (any case) or number, e.g. ethanol ``{"CH3": 1, "CH2": 1, "OH": 1}``. ``component_names``
    only labels the components in messages and in :meth:`describe`. :meth:`from_components`
    takes the published assignments of common solvents from the built-in table.
    """

    name = "unifac"
    variant = "original"
    volume_exponent = 1.0  # p in V'_i

    def __init__(
        self,
        groups: Sequence[Mapping[str | int, int]],
        *,
        component_names: Sequence[str] | None = None,
        where: str = "thermo.unifac.groups",
    ) -> None:
        if isinstance(groups, Mapping) or not isinstance(groups, Sequence) or len(groups) < 1:
            raise CaseError("UNIFAC needs one group table per component", key=where, value=groups)
        names = list(component_names) if component_names is not None else [f"component {i + 1}" for i in range(len(groups))]
        if len(names) != len(groups):
            raise CaseError("UNIFAC: one group table per component name", key=where, value=names)
        tables = load_tables(self.variant)
        counts = [_counts(name, g, tables, f"{where}.{name}") for name, g in zip(names, groups)]
        numbers = sorted({number for c in counts for number in c})
        subgroups = [tables.subgroups[number] for number in numbers]
        nu = np.array([[c.get(number, 0) for c in counts] for number in numbers], dtype=float)  # (g, c)
        self.component_count = len(groups)
        self.component_names = tuple(names)
        self._tables = tables
        self._counts = counts
        self._subgroups = subgroups
        volume = np.array([s.volume for s in subgroups])
        area = np.array([s.area for s in subgroups])
        self.r = nu.T @ volume
        self.q = nu.T @ area
        if np.any(self.r <= 0.0) or np.any(self.q <= 0.0):
            raise CaseError("UNIFAC: every component needs a positive volume and area (R, Q) from its groups", key=where)
        self._volume_weights = self.r**self.volume_exponent
        self._area_weights = (nu * area[:, None]).T.copy()  # (c, g): Q_k nu_ki
        self._a, self._b, self._c, self._pairs = self._interaction_matrices(where)
        self._temperature_terms = bool(np.any(self._b) or np.any(self._c))

    @classmethod
    def from_components(
        cls,
        names: Sequence[str],
        groups: Mapping[str, Mapping[str | int, int]] | None = None,
        *,
        where: str = "thermo.unifac.groups",
    ) -> UNIFAC:
        """The model for components ``names``: groups from ``groups`` (keyed by component name,
        any case) where given, else the built-in published assignment. A component with
        neither is a :class:`CaseError`."""
        given = {loose_key(k): v for k, v in (groups or {}).items()}
        assignments = []
        for name in names:
            found = given.get(loose_key(name))
            if found is None:
                found = builtin_groups(name, cls.variant)
            if found is None:
                raise CaseError(
                    f"no built-in {cls.variant} UNIFAC groups for component {name!r}; give its subgroups and counts",
                    key=f"{where}.{name}",
                    expected='a table such as { CH3 = 1, CH2 = 1, OH = 1 }',
                )
            assignments.append(found)
        return cls(assignments, component_names=list(names), where=where)

    def _interaction_matrices(self, where: str):
        mains = [s.main_group for s in self._subgroups]
        g = len(mains)
        a, b, c = np.zeros((g, g)), np.zeros((g, g)), np.zeros((g, g))
        missing = set()
        for m in range(g):
            for k in range(g):
                terms = self._tables.interaction(mains[m], mains[k])
                if terms is None:
                    missing.add((mains[m], mains[k]))
                else:
                    a[m, k], b[m, k], c[m, k] = terms
        if missing:
            names = self._tables.subgroups
            main_name = {s.main_group: s.main_group_name for s in names.values()}
            listed = ", ".join(f"{main_name[m]} ({m}) - {main_name[n]} ({n})" for m, n in sorted(missing))
            raise CaseError(
                f"{self.variant} UNIFAC has no published interaction parameters between main groups {listed}",
                key=where,
                expected="components whose groups all interact in the published table, or another liquid model",
            )
        pairs = sorted({(mains[m], mains[k]) for m in range(g) for k in range(g) if mains[m] != mains[k]})
        return a, b, c, pairs

    # ----------------------------------------------------------------------------------------

    def _psi(self, temperature: np.ndarray, derivatives: bool):
        """Psi (n, g, g) and its first and second temperature derivatives."""
        inverse = (1.0 / temperature)[:, None, None]
        exponent = self._a * -inverse
        d_exponent = self._a * (inverse * inverse)
        if self._temperature_terms:
            exponent -= self._b + self._c * temperature[:, None, None]
            d_exponent -= self._c
        psi = np.exp(exponent)
        d_psi = psi * d_exponent
        if not derivatives:
            return psi, d_psi, None
        d2_exponent = -2.0 * self._a * (inverse * inverse * inverse)
        d2_psi = psi * (d2_exponent + d_exponent * d_exponent)
        return psi, d_psi, d2_psi

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        """ln gamma and derivatives for temperature (n,) [K] and x (n, c); a single state may be
        a scalar temperature and x of shape (c,)."""
        temperature, x = check_states(self.name, self.component_count, temperature, x)
        r, q, weights_v = self.r, self.q, self._volume_weights
        area_weights = self._area_weights  # (c, g)

        # combinatorial part
        total = x.sum(axis=1, keepdims=True)
        r_sum, q_sum, v_sum = x @ r[:, None], x @ q[:, None], x @ weights_v[:, None]
        modified_volume = weights_v * (total / v_sum)  # V'_i
        ratio_vf = (r / q) * (q_sum / r_sum)  # V_i / F_i
        ln_gamma = 1.0 - modified_volume + np.log(modified_volume)
        ln_gamma -= HALF_COORDINATION_NUMBER * q * (1.0 - ratio_vf + np.log(ratio_vf))

        # residual part: mixture groups
        psi, d_psi, d2_psi = self._psi(temperature, derivatives)
        weights = x @ area_weights  # (n, g): w_k = Q_k sum_i nu_ki x_i
        weight_sum = weights.sum(axis=1, keepdims=True)
        sums = np.matmul(weights[:, None, :], psi)[:, 0, :]  # S_k = sum_m w_m Psi_mk
        ratio = weights / sums
        group_terms = 1.0 - np.log(sums / weight_sum) - np.matmul(psi, ratio[:, :, None])[:, :, 0]
        d_sums = np.matmul(weights[:, None, :], d_psi)[:, 0, :]
        relative = d_sums / sums
        d_group_terms = (
            np.matmul(psi, (ratio * relative)[:, :, None])[:, :, 0]
            - np.matmul(d_psi, ratio[:, :, None])[:, :, 0]
            - relative
        )
        # pure-component groups: sum_k nu_ki ln Gamma_k^(i) = -sum_k w_ik ln(S_ik / q_i)
        pure_sums = np.matmul(area_weights, psi)  # (n, c, g)
        pure_relative = np.matmul(area_weights, d_psi) / pure_sums
        ln_gamma += group_terms @ area_weights.T
        ln_gamma += np.einsum("ik,sik->si", area_weights, np.log(pure_sums / q[:, None]))
        d_ln_gamma_dT = d_group_terms @ area_weights.T + np.einsum("ik,sik->si", area_weights, pure_relative)

        r_t2 = GAS_CONSTANT * temperature * temperature
        first = np.einsum("si,si->s", x, d_ln_gamma_dT)
        enthalpy = -r_t2 * first
        if not derivatives:
            return ActivityResult(ln_gamma, None, None, enthalpy, None, None)

        # sum_i x_i d2 ln gamma_i / dT2
        d2_sums = np.matmul(weights[:, None, :], d2_psi)[:, 0, :]
        pure_second = np.matmul(area_weights, d2_psi) / pure_sums - pure_relative * pure_relative
        weighted_second = np.einsum("si,ik,sik->s", x, area_weights, pure_second) - np.einsum(
            "sk,sk->s", weights, d2_sums / sums - relative * relative
        )
        d_enthalpy_dT = -2.0 * GAS_CONSTANT * temperature * first - r_t2 * weighted_second
        d_enthalpy_dx = -r_t2[:, None] * d_ln_gamma_dT

        # composition: d ln Gamma_k / d w_j = Q_k M_kj with
        # M = 1/sum(w) - B - B^T + B diag(w) B^T, B_jk = Psi_jk / S_k
        scaled = psi / sums[:, None, :]
        scaled_t = scaled.transpose(0, 2, 1)
        group_hessian = np.matmul(scaled * weights[:, None, :], scaled_t)
        group_hessian -= scaled
        group_hessian -= scaled_t
        group_hessian += (1.0 / weight_sum)[:, :, None]
        d_ln_gamma_dx = np.matmul(np.matmul(area_weights, group_hessian), area_weights.T)
        per_k = 1.0 / total - weights_v / v_sum  # d ln V'_i / d x_k
        per_k_area = q / q_sum - r / r_sum  # d ln(V_i/F_i) / d x_k
        d_ln_gamma_dx += (1.0 - modified_volume)[:, :, None] * per_k[:, None, :]
        d_ln_gamma_dx -= (HALF_COORDINATION_NUMBER * q * (1.0 - ratio_vf))[:, :, None] * per_k_area[:, None, :]
        return ActivityResult(ln_gamma, d_ln_gamma_dT, d_ln_gamma_dx, enthalpy, d_enthalpy_dT, d_enthalpy_dx)

    def ln_gamma(self, temperature: np.ndarray, x: np.ndarray) -> np.ndarray:
        """ln gamma (n, c) for temperature (n,) [K] and x (n, c)."""
        return self.evaluate(temperature, x, derivatives=False).ln_gamma

    # ----------------------------------------------------------------------------------------

    def groups(self) -> list[dict[str, int]]:
        """Each component's groups as {published subgroup name: count}."""
        names = self._tables.subgroups
        return [{names[number].name: count for number, count in c.items()} for c in self._counts]

    def describe(self) -> dict:
        """Everything needed to re-check the model: groups, R and Q, the interaction parameters
        used and their sources."""
        description = self._tables.description
        builtin = builtin_source(self.variant)
        return {
            "model": self.name,
            "variant": self.variant,
            "component_count": self.component_count,
            "components": list(self.component_names),
            "groups": self.groups(),
            "subgroups": [
                {"number": s.number, "name": s.name, "main_group": s.main_group,
                 "main_group_name": s.main_group_name, "R": s.volume, "Q": s.area}
                for s in self._subgroups
            ],
            "r": self.r.tolist(),
            "q": self.q.tolist(),
            "combinatorial": f"V'_i = r_i^{self.volume_exponent:g} / sum_j x_j r_j^{self.volume_exponent:g}, z = 10",
            "interaction_form": description["interaction_form"],
            "interactions": [
                {"main_groups": [m, n], "a": t[0], "b": t[1], "c": t[2]}
                for m, n in self._pairs
                for t in [self._tables.interaction(m, n)]
            ],
            "source": description["model_source"],
            "parameter_sources": description["sources"],
            "copied_from": description["copied_from"],
            "built_in_group_assignments": builtin,
        }


class DortmundUNIFAC(UNIFAC):
    """Modified UNIFAC (Dortmund) (Weidlich & Gmehling 1987; Gmehling, Li & Schiller 1993):
    the combinatorial part with r_i^(3/4) in V'_i, the Dortmund R and Q, and temperature-dependent
    interactions Psi_mn = exp(-(a_mn + b_mn T + c_mn T^2) / T), which give heats of mixing.
    Same constructor as :class:`UNIFAC`; Dortmund subgroup names differ in places (e.g.
    "OH(P)", "OH(S)", "OH(T)" for primary, secondary and tertiary alcohols, "CY-CH2" in rings)."""

    name = "unifac-dortmund"
    variant = "dortmund"
    volume_exponent = 0.75
