/** The caution every result carries (SCIENCE.md §8). */
export const SAFETY_NOTICE =
  'branchwise computes molecular constants from the data it is given. It certifies nothing about the safety, ' +
  'purity or identity of a gas supply. CO is toxic; HCl, HBr and HF are corrosive and toxic, HF is acutely ' +
  'dangerous, and HCN is acutely toxic. Follow local codes, the safety data sheets and licensed practice.';
