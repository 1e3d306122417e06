/**
 * The kernel's accuracy settings: every grid size, quadrature order and tolerance in one documented
 * object, so that no accuracy-relevant literal is scattered through the code. The defaults reach
 * ~1e-10 relative on distances and times (checked in tests/kernel against astropy/scipy and the
 * analytic models). Physics modules add their own keys below the marked line.
 */
export const SETTINGS = {
  // --- background integrals (distances.ts) -------------------------------------------------
  /**
   * Up to this many redshifts per call, integrals are done directly (no grid is kept): Gauss–Legendre
   * panels between the sorted redshifts, or Chebyshev panels where the redshifts are dense; above it,
   * the model's lazily built ln-a grid with quintic Hermite interpolation is used (and kept).
   */
  directMaxPoints: 160,
  /** Widest Gauss–Legendre panel in ln a for direct integration (ln a units). */
  directPanelMax: 0.5,
  /**
   * Target relative error per Gauss–Legendre panel; the order is picked from the panel width w by
   * (w / (2ρ))^(2n) ≤ tol with ρ = `analyticRadius`.
   */
  directTolerance: 1e-13,
  /**
   * Assumed distance (in ln a) from the real axis to the nearest singularity of the integrands: Λ
   * against matter puts it at π/3; phantom w and CPL pull it in, hence the margin.
   */
  analyticRadius: 0.5,
  /** Highest Gauss–Legendre order used by a direct panel. */
  directMaxOrder: 12,
  /** Chebyshev nodes per panel for many redshifts in a call (interpolation error ~ρ_B^(−N), ~1e-14 here). */
  chebOrder: 16,
  /** Widest Chebyshev panel in ln a. */
  chebPanel: 0.25,
  /** Fewest points on one side of today for the Chebyshev panels (below it, Gauss–Legendre between points). */
  chebMinPoints: 8,
  /** Grid step in ln a for the interpolation grid (quintic Hermite error ~ h⁶ g⁽⁵⁾/46080). */
  gridStep: 1 / 32,
  /** Gauss–Legendre order per grid cell when the grid's cumulative integrals are built. */
  gridOrder: 4,
  /** Extra ln a beyond the requested range added when the grid is built or extended. */
  gridMargin: 0.5,
  /**
   * Deepest ln a integrated to for ages and conformal times; beyond it the remaining tail is added
   * analytically from the local power law E ∝ a^(−n) (negligible, ~1e-20 of the age, for radiation).
   */
  pastLnA: -40,
  /** Panel width in ln a for the deep past (ln a < −`deepPastFrom`), where integrands are pure powers. */
  deepPanel: 2,
  /** Where the deep past starts, in −ln a. */
  deepPastFrom: 14,
  /** Relative tolerance of the bisection that locates a bounce or turnaround (E² = 0). */
  rootTolerance: 1e-14,

  // --- massive neutrinos (components.ts) ---------------------------------------------------
  /** Upper end y = m c²/(k T_ν) of the tabulated Fermi–Dirac energy integral; above it, an asymptotic series. */
  nuTableYMax: 80,
  /** Nodes per unit y below y = 2 (a quarter of that above) of the tabulated integral (quintic Hermite, exact derivatives). */
  nuTablePerUnit: 32,
  /** Gauss–Legendre nodes per panel of the momentum integral when the table is built. */
  nuQuadOrder: 16,
  /** Panels in momentum x = p/(k T_ν) on [0, nuQuadXMax] for the momentum integral. */
  nuQuadPanels: 24,
  /** Momentum cut-off of the integral (the integrand falls as x³ e^(−x): e^(−60) is negligible). */
  nuQuadXMax: 60,

  // --- physics modules add their own keys below ------------------------------------------
  /** Relative tolerance of the cosmic-time integration of a(t), H(t) (history.ts, Dormand–Prince 5(4)). */
  historyRtol: 1e-12,
  /** Absolute tolerance of the same integration (state: ln a and H/H0). */
  historyAtol: 1e-14,
  /**
   * Scale factor where the cosmic-time integration into a bang or crunch stops; the remaining time
   * ∫₀^a da/(a|H|) is added by Gauss–Legendre in u = √(a/aStop) (smooth for any power law H ∝ a^(−n), n > 0).
   */
  historyAStop: 1e-5,
  /** Ever-expanding futures are followed until a reaches this value or the time below. */
  historyAMax: 1e4,
  /** Longest future followed, in Hubble times 1/H0. */
  historyTMaxHubble: 1e4,
  /** Smallest a scanned (ln-a grid) for a bounce by `pastLimit`; below it the past is taken to end in a bang. */
  pastScanAMin: 1e-12,
  /** Points per unit ln a of the `pastLimit` / energy-condition scans before bisection. */
  scanPerLnA: 16,
  /** Relative and absolute tolerances of the growth equation in ln a (growth.ts). */
  growthRtol: 1e-11,
  growthAtol: 1e-30,
  /**
   * Scale factor where the growth integration starts. The initial condition is the Mészáros (1974)
   * growing mode with radiation (exact for matter + radiation; curvature and Λ are < 1e-11 of the
   * total there), or without radiation D = a with first-order corrections, leaving O((Ω_k a/Ω_m)²) ~ 1e-13.
   */
  growthAInit: 1e-7,
  /**
   * Largest a of the growth solve (or just before a turnaround): z < 0 is available and the decaying
   * mode's integral ∫_a^∞ has a tail below ~1e-9 of its value beyond this point in Λ-dominated futures.
   */
  growthAEnd: 100,
  /** Relative tolerance of root searches on ä (acceleration onset) and energy-condition edges. */
  edgeTolerance: 1e-12,
} as const;

export type KernelSettings = typeof SETTINGS;
