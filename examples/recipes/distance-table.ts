// Distance table for survey planning: comoving, angular-diameter and luminosity distances, distance
// modulus, lookback time and angular scale from zMin to zMax in a flat model with H0, omegaM and w0.
const H0 = param('H0', { default: 68, min: 40, max: 100, unit: 'km/s/Mpc', label: 'Hubble constant H0' });
const omegaM = param('omegaM', { default: 0.31, min: 0.01, max: 1, label: 'Matter density Ωm' });
const w0 = param('w0', { default: -1, min: -2.5, max: 0, label: 'Dark-energy equation of state w0' });
const zMin = param('zMin', { default: 0.1, min: 0, max: 10, label: 'First redshift' });
const zMax = param('zMax', { default: 3, min: 0.01, max: 20, label: 'Last redshift' });
const steps = param('steps', { default: 30, min: 2, max: 2000, label: 'Number of redshifts' });

if (!(zMax > zMin)) throw new Error(`zMax (${zMax}) must be larger than zMin (${zMin})`);
const model = universe({ H0, omegaM, w0, Tcmb: 2.7255 });
const z = linspace(zMin, zMax, Math.round(steps));

show.table('Distances', [
  { name: 'z', values: z },
  { name: 'D_C', unit: 'Mpc', values: model.comovingDistance(z) },
  { name: 'D_A', unit: 'Mpc', values: model.angularDiameterDistance(z) },
  { name: 'D_L', unit: 'Mpc', values: model.luminosityDistance(z) },
  { name: 'μ', unit: 'mag', values: model.distanceModulus(z) },
  { name: 'lookback time', unit: 'Gyr', values: model.lookbackTime(z) },
  { name: 'scale', unit: 'kpc/arcsec', values: model.properSizePerArcsec(z) },
]);
show.value('D_L at zMax', model.luminosityDistance(zMax), 'Mpc');
show.value('age today', model.age(0), 'Gyr');
