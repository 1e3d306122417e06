/** Script API snippets the command bar can insert at the cursor (names follow shared/script-api.d.ts). */
export interface Snippet {
  id: string;
  title: string;
  keywords: string;
  text: string;
}

export const snippets: Snippet[] = [
  {
    id: 'universe',
    title: 'A flat ΛCDM model',
    keywords: 'universe model cosmology lcdm H0 omegaM',
    text: 'const u = universe({ H0: 70, omegaM: 0.3 });\n',
  },
  {
    id: 'universe-w0wa',
    title: 'A w0–wa dark-energy model with curvature',
    keywords: 'universe dark energy w0 wa curvature omegaK cpl',
    text: 'const u = universe({ H0: 67.7, omegaM: 0.31, omegaK: 0.0, w0: -0.9, wa: -0.2 });\n',
  },
  {
    id: 'grid',
    title: 'A redshift grid (linspace)',
    keywords: 'linspace grid redshift z array',
    text: 'const z = linspace(0.01, 2, 100);\n',
  },
  {
    id: 'distances',
    title: 'Distances table (comoving, luminosity, angular diameter)',
    keywords: 'distance table luminosity comoving angular diameter show.table',
    text:
      "show.table('distances', [\n" +
      "  { name: 'z', values: z },\n" +
      "  { name: 'D_C', unit: 'Mpc', values: u.comovingDistance(z) },\n" +
      "  { name: 'D_L', unit: 'Mpc', values: u.luminosityDistance(z) },\n" +
      "  { name: 'D_A', unit: 'Mpc', values: u.angularDiameterDistance(z) },\n" +
      ']);\n',
  },
  {
    id: 'plot',
    title: 'Line plot of a quantity against redshift',
    keywords: 'plot line show.plot chart figure',
    text: "show.plot({ type: 'line', x: z, series: [{ name: 'H(z)', values: u.H(z) }], xLabel: 'z', yLabel: 'H [km/s/Mpc]' });\n",
  },
  {
    id: 'value',
    title: 'Show one value with its unit (age today)',
    keywords: 'value show.value age number unit',
    text: "show.value('age today', u.age(0), 'Gyr');\n",
  },
  {
    id: 'param',
    title: 'Declare an input (param)',
    keywords: 'param input recipe form sweep',
    text: "const H0 = param('H0', { default: 70, min: 50, max: 90, unit: 'km/s/Mpc', label: 'Hubble constant' });\n",
  },
  {
    id: 'chi2',
    title: 'χ² against a group dataset',
    keywords: 'chi2 dataset fit data likelihood',
    text: "const data = dataset('name of dataset');\nshow.value('chi2', chi2(u, data).chi2);\n",
  },
  {
    id: 'energy',
    title: 'Energy conditions report',
    keywords: 'energy conditions raychaudhuri strong null weak dominant',
    text: 'print(JSON.stringify(u.energyConditions({ zMax: 5 })));\n',
  },
  {
    id: 'growth',
    title: 'Growth rate f and f·σ8 style plot',
    keywords: 'growth rate f fsigma8 growthFactor',
    text: "show.plot({ type: 'line', x: z, series: [{ name: 'f', values: u.growthRate(z) }, { name: 'D', values: u.growthFactor(z) }], xLabel: 'z', yLabel: 'f, D' });\n",
  },
];
