/**
 * The revision diff moved to src/shared/domain/text-diff.ts, where updates and photo stories
 * both use it; this keeps the old import path working for its existing test.
 */
export { diffText, diffTokens, tokenize, type DiffPart } from "#shared/domain/text-diff.ts";
