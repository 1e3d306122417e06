// χ² of a flat dark-energy model against the synthetic Aurora supernova distance moduli
// ("aurora-sn-synthetic", made from a fiducial model plus noise). The absolute magnitude is
// marginalised analytically, so H0 drops out; vary omegaM and w0 in a sweep for Δχ² contours.
const omegaM = param('omegaM', { default: 0.3, min: 0.05, max: 0.95, label: 'Matter density Ωm' });
const w0 = param('w0', { default: -1, min: -2.5, max: 0, label: 'Dark-energy equation of state w0' });

const model = universe({ H0: 70, omegaM, w0 });
const sn = dataset('aurora-sn-synthetic');
const fit = chi2(model, sn);

show.value('chi2', fit.chi2);
show.value('points', fit.n);
show.value('chi2 per point', fit.chi2 / fit.n);
