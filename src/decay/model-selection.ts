// Choice of the number of exponentials for components: 'auto'. Candidates 1–3 are fitted on the same
// channels; a model with one more component is accepted only when it converged, is acceptable (no parameter
// at a bound, no lifetime outside the resolvable range: acceptability.ts), lowers BIC by more than
// BIC_MARGIN, and keeps every amplitude above zero (no degenerate component). The margin 10 is the
// "very strong evidence" level of Kass & Raftery, J. Am. Stat. Assoc. 90, 773 (1995) (from memory).
import type { DecayFitResult, ModelSelection, SelectionCandidate } from './result.js';

export const BIC_MARGIN = 10;

/** Picks the number of components from fitted candidates (ascending components) and says why. */
export function selectComponents(fits: readonly DecayFitResult[]): {
  chosen: DecayFitResult;
  selection: ModelSelection;
} {
  const candidates: SelectionCandidate[] = fits.map((fit) => ({
    components: fit.components.length,
    bic: fit.bic,
    aic: fit.aic,
    deviance: fit.deviance,
    chi2Reduced: fit.chi2Reduced,
    runsZ: fit.runsTest.z,
    durbinWatson: fit.durbinWatson,
    converged: fit.converged,
    acceptable: fit.acceptable,
  }));
  const first = fits.find((fit) => fit.acceptable) ?? fits.find((fit) => fit.converged) ?? fits[0];
  if (first === undefined) throw new RangeError('model selection needs at least one candidate');
  let chosen = first;
  const notes: string[] = [];
  for (const candidate of fits) {
    if (candidate.components.length <= chosen.components.length) continue;
    const n = candidate.components.length;
    if (!candidate.converged) {
      notes.push(`${n} components did not converge`);
      break;
    }
    const gain = chosen.bic - candidate.bic;
    if (!candidate.acceptable) {
      notes.push(`${n} components are not acceptable (${candidate.unacceptableReasons.join('; ')})`);
      break;
    }
    const degenerate = candidate.components.some((component) => !(component.amplitude > 0));
    if (gain <= BIC_MARGIN) {
      notes.push(`${n} components lower BIC by only ${gain.toFixed(1)} (needs > ${BIC_MARGIN})`);
      break;
    }
    if (degenerate) {
      notes.push(`${n} components lower BIC by ${gain.toFixed(1)} but one amplitude is zero (degenerate)`);
      break;
    }
    notes.push(`${n} components lower BIC by ${gain.toFixed(1)} against ${chosen.components.length}`);
    chosen = candidate;
  }
  const c = chosen.components.length;
  const structure = chosen.durbinWatson < 1.7 || Math.abs(chosen.runsTest.z) > 3 ? '; residual structure remains' : '';
  const reason =
    `${c} component${c === 1 ? '' : 's'} chosen: ${notes.join('; ') || 'the only converged candidate'}; ` +
    `χ²_red ${chosen.chi2Reduced.toFixed(3)}, runs z ${chosen.runsTest.z.toFixed(2)}, Durbin–Watson ${chosen.durbinWatson.toFixed(2)}${structure}.`;
  return { chosen, selection: { chosenComponents: c, candidates, reason } };
}
