/** Axis arithmetic shared by the hand-drawn SVG charts (Hb course, projection, oxygen content). */
export interface Domain {
  lo: number
  hi: number
}
export interface Margins {
  left: number
  right: number
  top: number
  bottom: number
}

/** Hb axis in g/L on a 10 g/L grid, with room above and below every value it must show. */
export function hbAxisDomain(values: number[]): Domain {
  return { lo: Math.floor((Math.min(...values) - 8) / 10) * 10, hi: Math.ceil((Math.max(...values) + 8) / 10) * 10 }
}

/** Ticks every 10 g/L, or every 20 when the axis is long. */
export function hbAxisTicks({ lo, hi }: Domain): number[] {
  const step = hi - lo > 80 ? 20 : 10
  const out: number[] = []
  for (let v = lo; v <= hi; v += step) out.push(v)
  return out
}

/** Values at the given fractions of a domain (for date axes, where round numbers mean nothing). */
export function ticksAt({ lo, hi }: Domain, fractions: number[]): number[] {
  return fractions.map((f) => lo + f * (hi - lo))
}

/** Maps a value in the domain to an x position inside the margins of a chart `width` wide. */
export function scaleX(d: Domain, width: number, m: Margins): (v: number) => number {
  return (v) => m.left + ((v - d.lo) / (d.hi - d.lo)) * (width - m.left - m.right)
}

/** Maps a value in the domain to a y position (up is larger) inside the margins of a chart `height` tall. */
export function scaleY(d: Domain, height: number, m: Margins): (v: number) => number {
  return (v) => height - m.bottom - ((v - d.lo) / (d.hi - d.lo)) * (height - m.top - m.bottom)
}
