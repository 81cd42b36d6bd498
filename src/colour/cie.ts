// CIE 1931 2-degree colour matching functions, multi-lobe analytic fit of Wyman, Sloan & Shirley,
// "Simple analytic approximations to the CIE XYZ color matching functions", JCGT 2(2), 2013.
// Each lobe is a Gaussian with one inverse width below its peak and another above; the constants
// are the paper's published ones (its inverse widths, rounded as printed).

/** weight * exp(-t^2 / 2) with t = (nm - peak) * (nm < peak ? invBelow : invAbove) */
function lobe(nm: number, weight: number, peak: number, invBelow: number, invAbove: number): number {
  const t = (nm - peak) * (nm < peak ? invBelow : invAbove);
  return weight * Math.exp(-0.5 * t * t);
}

export function xBar(nm: number): number {
  return lobe(nm, 0.362, 442.0, 0.0624, 0.0374) + lobe(nm, 1.056, 599.8, 0.0264, 0.0323) - lobe(nm, 0.065, 501.1, 0.049, 0.0382);
}

export function yBar(nm: number): number {
  return lobe(nm, 0.821, 568.8, 0.0213, 0.0247) + lobe(nm, 0.286, 530.9, 0.0613, 0.0322);
}

export function zBar(nm: number): number {
  return lobe(nm, 1.217, 437.0, 0.0845, 0.0278) + lobe(nm, 0.681, 459.0, 0.0385, 0.0725);
}
