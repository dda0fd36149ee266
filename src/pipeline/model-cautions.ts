/**
 * What a reader of a fit must be told about this pipeline's model beyond the
 * general cautions (src/fit/cautions.ts): layered columns, a first stage, a
 * physical track (docs/cloud-structure.md). One sentence each, in fit.json and the report.
 */
import type { Pipeline } from '../config/pipeline.ts';
import type { TrackValueSpec } from '../config/sections/track.ts';
import { layeredColumns } from '../grid/expand.ts';

export function modelCautions(pipeline: Pipeline): string[] {
  const c = pipeline.config;
  const out: string[] = [];
  const columns = layeredColumns(c.conditions);
  if (columns) {
    const shape = columns.geometry.kind === 'slab' ? 'a slab lit on both faces' : `a sphere seen at ${columns.geometry.impactParameter} of its radius from the centre`;
    out.push(
      `Columns are sums over the layers of ${shape} (cells of ${columns.step} mag, each a uniform-density model at its own depth, no exchange between layers); visual_extinction in the outputs is each sightline's line-of-sight A_V, and the ice threshold is the model's own (docs/cloud-structure.md section 1).`,
    );
  }
  if (typeof c.initial === 'object' && 'first_stage' in c.initial) {
    const f = c.initial.first_stage as { age_yr: number; conditions: Record<string, number> };
    const at = Object.entries(f.conditions).map(([k, v]) => `${k} ${v}`).join(', ');
    out.push(`Ages count from the end of a first stage of ${f.age_yr} yr (${at || 'default conditions'}), not from an atomic start (docs/cloud-structure.md section 2).`);
  }
  const t = c.physical_track;
  if (t?.kind === 'free-fall') {
    out.push(
      `Densities follow a free-fall collapse (retardation ${trackValueText(t.retardation)}) from each model's density to ${trackValueText(t.final_density)} cm^-3${t.av_growth ? ', with A_V growing as (n_H/n_0)^(2/3)' : ''}: the density in the outputs is the start density and the age the time since the collapse began (docs/cloud-structure.md section 3).`,
    );
  } else if (t?.kind === 'warm-up') {
    out.push(
      `Gas and dust warm up (${t.shape}${t.exponent ? `, exponent ${t.exponent}` : ''}) from each model's temperatures to ${trackValueText(t.final_temperature)} K over ${trackValueText(t.duration_yr)} yr: the temperatures in the outputs are the start values and the age the time since the warm-up began (docs/cloud-structure.md section 3).`,
    );
  }
  return out;
}

/** A track parameter as the cautions name it: its value, or the grid axis it runs over. */
function trackValueText(v: TrackValueSpec): string {
  if (typeof v === 'number') return String(v);
  if (Array.isArray(v)) return `each of ${v.join(', ')} (a grid axis)`;
  return `${v.from} to ${v.to} in ${v.count} steps (a grid axis)`;
}
