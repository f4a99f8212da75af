import { create, parseDependencies } from 'mathjs';

// Only the parser: this runs in the browser (see expression-tex.ts).
const { parse } = create({ parseDependencies });

/** Constants the validator knows without a parameter (check-expression.ts). */
const CONSTANTS = new Set(['pi', 'e']);

interface MathNode {
  isSymbolNode?: boolean;
  isFunctionNode?: boolean;
  name?: string;
  traverse(cb: (node: MathNode, path: string, parent: MathNode | null) => void): void;
}

/**
 * Symbols of `expression` that are neither in `known` nor a constant, in order of first appearance:
 * "a - r * x + K" with known [x, a] → ["r", "K"]. Function names (exp, tanh, …) are not symbols.
 * An expression that does not parse yet gives [] (the validator reports it).
 */
export function unknownSymbols(expression: string, known: Iterable<string>): string[] {
  if (expression.trim() === '') return [];
  let root: MathNode;
  try {
    root = parse(expression) as unknown as MathNode;
  } catch {
    return [];
  }
  const skip = new Set(known);
  const out: string[] = [];
  root.traverse((node, path, parent) => {
    if (!node.isSymbolNode || !node.name) return;
    if (parent?.isFunctionNode && path === 'fn') return;
    if (skip.has(node.name) || CONSTANTS.has(node.name) || out.includes(node.name)) return;
    out.push(node.name);
  });
  return out;
}
