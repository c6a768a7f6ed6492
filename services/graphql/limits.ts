import {
  type FieldNode,
  GraphQLError,
  Kind,
  type SelectionSetNode,
  type ValidationContext,
  type ValidationRule,
} from 'graphql';
import { LINEAR_REFERENCE } from '../../src/linear/reference.js';
import { libraryEntries } from '../../src/species/library.js';

/**
 * Limits on what one GraphQL request may ask, checked before anything runs, on each operation as it would be
 * executed: every fragment spread counts its fragment's fields again (a fragment of 100 fields spread under 50
 * aliases is 5 000 fields, not 150), and the fields under a library list (`species`, `linearSpecies` without a
 * literal `formula`) count once per entry of the list.
 * - work fields (fit, check, peaks, predict, potential: each one a computation) at most MAX_WORK_FIELDS, however
 *   they are aliased or repeated in fragments, so that one small query cannot start hundreds of fits;
 * - fields in all at most MAX_FIELDS (aliases and fragments multiply the answer's size);
 * - depth at most MAX_DEPTH, through fragments, not counting the introspection fields (`__schema`, `__type` …) and
 *   what lies under them, so that the standard introspection query of schema tools is let through.
 * Each fragment is costed once (memoised), so a chain of fragments each spreading the next twice is counted in
 * linear time; a fragment cycle counts nothing here (graphql's own NoFragmentCycles rule refuses it).
 * Errors carry extensions.code GRAPHQL_REFUSED, like the REST problem of the same name.
 */
export const MAX_WORK_FIELDS = 4;
export const MAX_FIELDS = 2_000;
export const MAX_DEPTH = 12;
const WORK = new Set(['fit', 'check', 'peaks', 'predict', 'potential']);

/** Entries a library list field answers when no single formula is named. */
export const LIBRARY_LIST_LENGTH: { readonly species: number; readonly linearSpecies: number } = {
  species: libraryEntries().length,
  linearSpecies: LINEAR_REFERENCE.length,
};

const refuse = (message: string) => new GraphQLError(message, { extensions: { code: 'GRAPHQL_REFUSED' } });

interface Cost {
  /** Fields as executed (fragments expanded, library lists multiplied). */
  readonly fields: number;
  /** Deepest nesting of non-introspection fields. */
  readonly depth: number;
  /** Work fields at this selection set's own level. */
  readonly work: number;
}

const NONE: Cost = { fields: 0, depth: 0, work: 0 };

/** How many entries a field's selection is answered for: the library's length for a list without a literal formula. */
function multiplicity(field: FieldNode): number {
  const name = field.name.value;
  if (name !== 'species' && name !== 'linearSpecies') return 1;
  const length = LIBRARY_LIST_LENGTH[name];
  const formula = field.arguments?.find((a) => a.name.value === 'formula');
  return formula?.value.kind === Kind.STRING ? 1 : Math.max(length, 1);
}

function costOf(context: ValidationContext): (set: SelectionSetNode, introspection: boolean) => Cost {
  const memo = new Map<string, Cost>();
  const visiting = new Set<string>();
  const cost = (set: SelectionSetNode, introspection: boolean): Cost => {
    let fields = 0;
    let depth = 0;
    let work = 0;
    const add = (c: Cost) => {
      fields += c.fields;
      depth = Math.max(depth, c.depth);
      work += c.work;
    };
    for (const selection of set.selections) {
      if (selection.kind === Kind.FIELD) {
        const name = selection.name.value;
        const inside = introspection || name.startsWith('__');
        const child = selection.selectionSet ? cost(selection.selectionSet, inside) : NONE;
        fields += 1 + child.fields * multiplicity(selection);
        if (!inside) depth = Math.max(depth, 1 + child.depth);
        if (WORK.has(name)) work++;
      } else if (selection.kind === Kind.INLINE_FRAGMENT) {
        add(cost(selection.selectionSet, introspection));
      } else {
        const name = selection.name.value;
        const key = `${introspection ? 'i' : 'o'}:${name}`;
        const known = memo.get(key);
        if (known) {
          add(known);
          continue;
        }
        const fragment = context.getFragment(name);
        if (!fragment || visiting.has(name)) continue;
        visiting.add(name);
        const c = cost(fragment.selectionSet, introspection);
        visiting.delete(name);
        memo.set(key, c);
        add(c);
      }
    }
    return { fields, depth, work };
  };
  return cost;
}

export const limitQueryCost: ValidationRule = (context: ValidationContext) => {
  const cost = costOf(context);
  return {
    OperationDefinition(node) {
      const c = cost(node.selectionSet, false);
      // Work fields are fields of Query itself: those at the operation's own level, fragments included.
      if (c.work > MAX_WORK_FIELDS)
        context.reportError(
          refuse(
            `the query asks for more than ${MAX_WORK_FIELDS} computations (fit, check, peaks, predict, potential)`,
          ),
        );
      else if (c.depth > MAX_DEPTH) context.reportError(refuse(`the query is nested deeper than ${MAX_DEPTH} levels`));
      else if (c.fields > MAX_FIELDS)
        context.reportError(
          refuse(
            `the query selects more than ${MAX_FIELDS} fields (counting a fragment's fields at every use and the fields under a library list once per entry)`,
          ),
        );
    },
  };
};
