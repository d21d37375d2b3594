// Okabe–Ito colours, distinguishable with the common colour-vision deficiencies (Okabe & Ito, 2008, "Color Universal Design").
export const BAR_COLOURS = ['#0072B2', '#E69F00', '#009E73', '#CC79A7', '#56B4E9', '#D55E00'];

/** A band value with three decimals; an em dash for none or a non-finite value. */
export const formatValue = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? '—' : v.toFixed(3));
