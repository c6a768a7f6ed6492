import { GraphQLError, type ValidationContext, type ValidationRule } from 'graphql';

/**
 * Limits on what one GraphQL request may ask, checked before anything runs:
 * - work fields (fit, check, peaks, predict, potential: each one a computation) at most MAX_WORK_FIELDS, however
 *   they are aliased or repeated in fragments, so that one small query cannot start hundreds of fits;
 * - fields in all at most MAX_FIELDS (aliases multiply the answer's size);
 * - depth at most MAX_DEPTH, not counting the introspection fields (`__schema`, `__type` …), so that the standard
 *   introspection query of schema tools is let through.
 * Errors carry extensions.code GRAPHQL_REFUSED, like the REST problem of the same name.
 */
export const MAX_WORK_FIELDS = 4;
export const MAX_FIELDS = 2_000;
export const MAX_DEPTH = 12;
const WORK = new Set(['fit', 'check', 'peaks', 'predict', 'potential']);

const refuse = (message: string) => new GraphQLError(message, { extensions: { code: 'GRAPHQL_REFUSED' } });

export const limitQueryCost: ValidationRule = (context: ValidationContext) => {
  let work = 0;
  let fields = 0;
  let depth = 0;
  let maxDepth = 0;
  let introspection = 0;
  let reported = false;
  const report = (message: string) => {
    if (reported) return;
    reported = true;
    context.reportError(refuse(message));
  };
  return {
    Field: {
      enter(node) {
        const name = node.name.value;
        if (name.startsWith('__')) introspection++;
        if (introspection === 0) {
          depth++;
          maxDepth = Math.max(maxDepth, depth);
          if (maxDepth > MAX_DEPTH) report(`the query is nested deeper than ${MAX_DEPTH} levels`);
        }
        if (++fields > MAX_FIELDS) report(`the query selects more than ${MAX_FIELDS} fields`);
        if (WORK.has(name) && depth === 1 && ++work > MAX_WORK_FIELDS)
          report(
            `the query asks for more than ${MAX_WORK_FIELDS} computations (fit, check, peaks, predict, potential)`,
          );
      },
      leave(node) {
        if (introspection === 0) depth--;
        if (node.name.value.startsWith('__')) introspection--;
      },
    },
  };
};
