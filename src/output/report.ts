/**
 * The identification report: one self-contained HTML file (no external
 * files, styles inline, the figure embedded as a base64 PNG with the SVG
 * beside it in a collapsible block) with the conditions and their
 * parameters, the ranking, the g.b table, the verdict and its rule, and a
 * plain statement that simulations are a model and which micrographs are
 * synthetic.
 */
import { sig } from '../format.js';
import { DEFAULT_MAX_ROTATION_DEG, DEFAULT_MAX_SCALE } from '../analysis/registration.js';
import type { IdentifyResult } from '../analysis/identify.js';
import { fmtFraction } from './comparisonFigure.js';
import { decisionWord, fitText, gapText, noiseText } from '../analysis/identifyText.js';

export interface ReportInputs {
  readonly scenarioFile: string;
  /** The absorption used (describeAbsorption); omitted: "one absorption ratio". */
  readonly absorption?: string;
  /** PNG bytes of the comparison figure. */
  readonly figurePng: Uint8Array;
  /** File names of the figure as written beside the report. */
  readonly figureFiles?: readonly string[];
  /** When the report was made (ISO text); omitted: not shown. */
  readonly date?: string;
  readonly version?: string;
}

export function escapeHtml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

const e = escapeHtml;

function vec(v: readonly number[]): string {
  return `(${v.map((x) => fmtFraction(x)).join(' ')})`;
}

function table(head: readonly string[], rows: readonly (readonly string[])[], cls = ''): string {
  const th = head.map((h) => `<th>${h}</th>`).join('');
  const tr = rows.map((r) => `<tr>${r.map((c) => `<td>${c}</td>`).join('')}</tr>`).join('\n');
  return `<table${cls ? ` class="${cls}"` : ''}><thead><tr>${th}</tr></thead><tbody>\n${tr}\n</tbody></table>`;
}

export function identifyReportHtml(res: IdentifyResult, inp: ReportInputs): string {
  const v = res.verdict;
  const synth = res.micrographs.filter((m) => m.synthetic);
  const png64 = Buffer.from(inp.figurePng).toString('base64');
  const conds = res.micrographs;

  const syntheticNote =
    synth.length === 0
      ? '<p>All micrographs were supplied by the user; thinfoil has not checked where they come from.</p>'
      : `<p class="warn"><strong>Synthetic micrographs:</strong> ${synth.map((m) => `${e(m.conditionId)} (${e(m.source)})`).join(', ')} ${synth.length === 1 ? 'was' : 'were'} made by thinfoil from a simulated hidden candidate with added blur, background gradient and noise. ${synth.length === conds.length ? 'Nothing in this report is a measurement.' : 'They are not measurements.'}</p>`;

  const conditionRows = conds.map((m) => {
    const r = m.resolved;
    return [
      e(m.conditionId),
      vec(m.condition.g),
      `[${m.condition.beam.map((x) => fmtFraction(x)).join(' ')}]`,
      m.settings.field === 'bf' ? 'bright field' : 'dark field',
      sig(r.xi_nm),
      sig(r.xiAbs_nm),
      sig(r.s_per_nm, 3),
      sig(r.w, 3),
      e(r.deviationSource),
      sig(r.frame.thickness_nm),
      sig(r.frame.columnLength_nm),
      `${e(m.source)}${m.synthetic ? ' <strong>(synthetic)</strong>' : ''}`,
      `${sig(m.filePixel_nm)} (${m.pixelFrom})`,
      `[${m.crop.join(', ')}], bin ${m.bin}`,
      `${m.width} x ${m.height} at ${sig(m.pixel_nm)}`,
      `${sig(m.gAngle_deg, 3)}${m.settings.mirrored ? ', mirrored' : ''}`,
      m.settings.intensity === 'linear' ? `linear, offset ${sig(m.settings.offset)}` : 'display (scale fitted freely)',
      sig(m.settings.blur_nm),
    ];
  });

  const rankingRows = res.ranking.map((r, i) => {
    const cmp = v.comparisons.find((c) => c.candidate === r.candidate);
    const status = i === 0 ? (v.decision === 'identified' ? '<strong>identified</strong>' : '<strong>best, not decisive</strong>') : cmp?.excluded ? 'excluded' : '<strong>not excluded</strong>';
    return [
      String(i + 1),
      e(r.candidate),
      sig(r.score, 4),
      i === 0 ? '' : gapText(cmp?.gap),
      i === 0 || cmp?.gapSigma === undefined ? '' : sig(cmp.gapSigma, 2),
      i === 0 ? '' : gapText(cmp?.threshold),
      status,
      ...r.perCondition.map((p) => `${sig(p.r2, 3)} <span class="dim">/ ${sig(p.ncc, 3)}</span>`),
      r.fullySearched ? 'own' : 'from best',
    ];
  });

  const fitRows = res.ranking.filter((r) => r.fit).map((r) => `<li><strong>${e(r.candidate)}</strong>: ${e(fitText(r.fit!))}</li>`);
  const quantity = res.ranking[0]?.perCondition[0]?.visibility.quantity ?? '';
  const gbRows = res.ranking.map((r) => [
    e(r.candidate),
    ...r.perCondition.map((p) => {
      const vis = p.visibility;
      if (vis.quantity === '' || vis.value === undefined) return '-';
      const extra = vis.gbxu === undefined ? '' : `, g.(b x u) = ${sig(vis.gbxu, 3)}`;
      return `${fmtFraction(vis.value)} <span class="dim">${e(vis.verdict ?? '')}${extra}</span>`;
    }),
  ]);

  const best = res.ranking[0];
  const regRows = best.perCondition.map((p) => [
    e(p.condition),
    `${sig(p.shift_nm[0], 3)}, ${sig(p.shift_nm[1], 3)}`,
    sig(p.rotation_deg, 3),
    sig(p.scale, 4),
    sig(p.amplitude, 3),
    sig(p.ncc, 3),
    sig(p.r2, 3),
  ]);

  const condHead = conds.map((m) => e(m.conditionId));
  const svgNote = inp.figureFiles && inp.figureFiles.length > 0 ? `<p class="dim">Figure files: ${inp.figureFiles.map(e).join(', ')}.</p>` : '';

  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>${e(res.scenario)}: identification report</title>
<style>
body { font-family: "DejaVu Sans", Helvetica, Arial, sans-serif; color: #1c1c20; max-width: 1180px; margin: 2em auto; padding: 0 1em; line-height: 1.45; }
h1 { font-size: 1.6em; margin-bottom: 0.2em; }
h2 { font-size: 1.2em; margin-top: 1.8em; border-bottom: 1px solid #ccc; }
table { border-collapse: collapse; margin: 0.6em 0; font-size: 0.88em; }
th, td { border: 1px solid #c8c8cc; padding: 0.25em 0.5em; text-align: left; vertical-align: top; }
th { background: #eef3f2; }
.dim { color: #66666f; }
.model { border-left: 5px solid #007a70; background: #f2f8f7; padding: 0.6em 1em; }
.warn { border-left: 5px solid #cd7d00; background: #fdf6ea; padding: 0.6em 1em; }
.verdict { font-size: 1.15em; padding: 0.7em 1em; border: 2px solid ${v.decision === 'identified' ? '#007a70' : v.decision === 'cannot tell' ? '#cd7d00' : '#b02020'}; }
img { max-width: 100%; border: 1px solid #ddd; }
</style>
</head>
<body>
<h1>${e(res.scenario)}: which candidate explains the micrographs?</h1>
<p class="dim">Target: ${e(res.defectLabel)} (defect ${res.defectIndex} of the scenario file ${e(inp.scenarioFile)}); ${res.candidates.length} candidates; ${conds.length} micrograph${conds.length === 1 ? '' : 's'}.${inp.date ? ` Made ${e(inp.date)}.` : ''}${inp.version ? ` thinfoil ${e(inp.version)}.` : ''}</p>

<div class="model"><strong>Simulations are a model, not a measurement.</strong> The simulated images come from the two-beam Howie-Whelan equations in the column approximation with ${e(res.elasticity)}, ${e(res.surfaces)}, ${inp.absorption ? `absorption: ${e(inp.absorption)}` : 'one absorption ratio'}, no beam convergence and no detector response beyond the blur given per micrograph. A good match supports a candidate under these assumptions; it does not prove it.</div>
${syntheticNote}

<h2>Verdict</h2>
<p class="verdict"><strong>${e(decisionWord(v.decision))}:</strong> ${e(v.statement)}</p>
<p><strong>Rule.</strong> ${e(v.rule)} Gap to the runner-up: ${gapText(v.gap)}; bootstrap standard deviation of that gap: ${sig(v.gapSigma, 2)}; spread across the parameter ranges: ${gapText(v.modelSpread)}; gap needed: ${gapText(v.threshold)}. Every other candidate's gap and needed gap are in the ranking below.</p>
${res.flags.length > 0 ? `<p class="warn"><strong>Flagged micrographs.</strong> ${res.flags.map((f) => e(f.message)).join('<br>')}</p>` : ''}
${v.decision === 'cannot tell' ? `<p>Not excluded by the best candidate: ${v.indistinguishable.map(e).join(', ')}. More micrographs under conditions where these candidates differ (a g with different g.b for them, or the opposite sign of g or s) would separate them.</p>` : ''}

<h2>Comparison figure</h2>
<img alt="micrographs (top row) and simulated images of the leading candidates" src="data:image/png;base64,${png64}">
${svgNote}

<h2>Ranking</h2>
<p>Score: the mean over the micrographs of R², the fraction of the micrograph's contrast variance (relative contrast I/I<sub>background</sub> - 1, background plane removed) explained by the registered simulation times its contrast scale. One contrast scale is shared by all micrographs with linear intensities (each may differ from it by at most a factor ${sig(res.settings.amplitudeSpread)}), so a candidate that predicts contrast where a micrograph shows none is penalised; R² can then be negative. Per micrograph the table shows R² / normalised cross-correlation. The ${res.settings.top} leading candidates had their own rotation and scale searched; the others use the rotation and scale found for the best of them (these belong to the micrograph), with their own shift.</p>
${table(['#', 'candidate', 'score', 'gap to best', 'sigma of gap', 'gap needed', 'status', ...condHead.map((h) => `${h}: R² / NCC`), 'rotation, scale'], rankingRows)}

<h2>Fitted parameters</h2>
${fitRows.length > 0 ? `<p>Each leading candidate's nuisance parameters, fitted within the ranges stated in the scenario ("fit"; defaults: w +- ${res.settings.fit === false ? 0.3 : sig(res.settings.fit.wRange)}, thickness +- ${res.settings.fit === false ? 15 : sig(100 * res.settings.fit.thicknessRange)} %, depth +- a quarter of the thickness, line within ${res.settings.fit === false ? 5 : sig(res.settings.fit.lineCone_deg)} degrees; measured values +- 2 uncertainties). The pixel size is not fitted.</p>
<ul>${fitRows.join('\n')}</ul>` : '<p>Not fitted: every parameter as stated in the scenario.</p>'}

<h2>Noise and residual</h2>
<p>${e(res.absolute.method)}</p>
<ul>${res.absolute.perMicrograph.map((p) => `<li>${e(p.condition)}: ${e(noiseText(p))}</li>`).join('\n')}</ul>

<h2>${quantity === 'g.R' ? 'g.R' : 'g.b'} table</h2>
<p>The rule of thumb beside the simulations (Hirsch et al. 1965; Howie &amp; Whelan 1962): g.b = 0 (and g.(b x u) = 0) predicts invisibility; a residual contrast remains for edge and mixed dislocations when |g.(b x u)| is large.</p>
${table(['candidate', ...condHead.map((h, i) => `${h} ${vec(conds[i].condition.g)}`)], gbRows)}

<h2>Conditions</h2>
${table(['id', 'g', 'beam', 'field', 'xi_g (nm)', "xi'_g (nm)", 's (1/nm)', 'w = s xi_g', 's from', 'thickness t (nm)', 'column length (nm)', 'micrograph', 'file pixel (nm)', 'crop, bin', 'compared (px, nm)', 'g angle (deg)', 'intensity', 'blur (nm)'], conditionRows)}

<h2>Registration of the best candidate</h2>
<p>Shift: where the simulation's centre lies in the micrograph relative to the crop centre (nm, +y down). Rotation: counter-clockwise on the screen. Contrast scale: simulated relative contrast is multiplied by it.</p>
${table(['condition', 'shift (nm)', 'rotation (deg)', 'scale', 'contrast scale', 'NCC', 'R²'], regRows)}

<h2>Method and settings</h2>
<ul>
<li>Each candidate is simulated under each micrograph's condition, with g turned to the micrograph's direction and at its pixel size, on the crop plus a margin for the shift search.</li>
<li>Registration: normalised cross-correlation over all shifts by FFT (Lewis 1995), sub-pixel peak by parabola; rotation (up to ${DEFAULT_MAX_ROTATION_DEG} degrees) and scale (up to ${100 * DEFAULT_MAX_SCALE} %) by a coarse-to-fine search on the correlation peak.</li>
<li>Noise of the scores: ${res.settings.bootstrap} bootstrap copies of the micrographs (the best candidate's fitted image plus its residual resampled in blocks, seed ${res.settings.seed}); each leading candidate re-registered (shift) and re-scored on every copy.</li>
<li>Exclusion rule: gap &gt; ${sig(res.settings.sigmas)} standard deviations of the bootstrap gap plus the spread of the gap across the fitted parameter ranges, and &gt; 0.002.</li>
<li>Time: simulation ${sig(res.seconds.render, 3)} s, registration ${sig(res.seconds.register, 3)} s, fit ${sig(res.seconds.fit, 3)} s, bootstrap ${sig(res.seconds.bootstrap, 3)} s, checks ${sig(res.seconds.checks, 3)} s.</li>
</ul>
</body>
</html>
`;
}
