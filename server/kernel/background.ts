/**
 * The contract between the parts of the kernel: a model is a list of components, each with its
 * density today and how that density and its equation of state evolve with the scale factor a.
 * Everything else (distances, times, a(t), energy conditions, growth) derives from this one
 * description; no module keeps its own copy of a model's physics.
 *
 * Densities are in units of today's critical density, ρ_crit,0 = 3 H0² / (8πG), so that
 * E²(a) = Σ_i density_i(a) + Ω_k a⁻² (the Friedmann equation).
 */

export type ComponentKind =
  | 'matter'          // cold dark matter + baryons, w = 0
  | 'photons'         // w = 1/3, from T_CMB
  | 'neutrinos'       // massless and massive species together
  | 'darkEnergy'      // Λ, constant w or CPL w0–wa, or a user w(a)
  | 'fluid';          // an extra component with its own w

export interface Component {
  /** Stable identifier, e.g. 'matter', 'photons', 'neutrinos', 'darkEnergy', 'fluid[0]'. */
  readonly name: string;
  readonly kind: ComponentKind;
  /** Density today in units of ρ_crit,0 (dimensionless Ω_i,0). */
  readonly omega0: number;
  /** ρ_i(a) / ρ_crit,0 (dimensionless). Must accept any a > 0, including a > 1 (the future). */
  density(a: number): number;
  /** Equation of state w_i(a) = p_i / (ρ_i c²) (dimensionless). */
  w(a: number): number;
}

export interface Background {
  /** Hubble constant today, km/s/Mpc. */
  readonly H0: number;
  /** Curvature density today, Ω_k,0 = −k c² / (a0 H0)² (dimensionless). */
  readonly omegaK: number;
  readonly components: readonly Component[];
  /** E²(a) = H²(a)/H0² = Σ_i ρ_i(a)/ρ_crit,0 + Ω_k a⁻² (Friedmann equation). */
  E2(a: number): number;
  /** (ä/a)/H0² = −½ Σ_i ρ_i(a)/ρ_crit,0 · (1 + 3 w_i(a)) (Raychaudhuri / second Friedmann equation). */
  accel(a: number): number;
}
