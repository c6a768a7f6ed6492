import type { Observation } from '../models/linear-model.js';

/**
 * One value per band (species, v′, v″), made when the band is first met, in the order the bands are first met.
 * Keyed by a number within each species (v′ · 1024 + v″, v < 1024): a string key built for every observation cost
 * more than the grouping it served on long lists.
 */
export class BandTable<T> {
  private readonly bySpecies = new Map<string, Map<number, T>>();
  readonly inOrder: T[] = [];

  constructor(private readonly make: (o: Pick<Observation, 'species' | 'upperV' | 'lowerV'>) => T) {}

  /** The value of o's band, made first if o is the first observation of its band. */
  of(o: Pick<Observation, 'species' | 'upperV' | 'lowerV'>): T {
    let m = this.bySpecies.get(o.species);
    if (!m) {
      m = new Map();
      this.bySpecies.set(o.species, m);
    }
    const key = o.upperV * 1024 + o.lowerV;
    let v = m.get(key);
    if (v === undefined) {
      v = this.make(o);
      m.set(key, v);
      this.inOrder.push(v);
    }
    return v;
  }
}
