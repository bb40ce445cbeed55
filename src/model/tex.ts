import { isFunctionNode, isSymbolNode, type MathNode } from "mathjs";

const GREEK = new Set([
  "alpha",
  "beta",
  "gamma",
  "delta",
  "epsilon",
  "zeta",
  "eta",
  "theta",
  "iota",
  "kappa",
  "lambda",
  "mu",
  "nu",
  "xi",
  "rho",
  "sigma",
  "upsilon",
  "chi",
  "psi",
  "omega",
  "Gamma",
  "Delta",
  "Theta",
  "Lambda",
  "Xi",
  "Sigma",
  "Upsilon",
  "Phi",
  "Psi",
  "Omega",
]);

/** A user name in TeX: `a12` → a_{12}, `K_max` → K_{\mathrm{max}}, `beta` → \beta. */
export function nameToTex(name: string): string {
  const base = (s: string) => (GREEK.has(s) ? `\\${s}` : s.length === 1 ? s : `\\mathit{${s}}`);
  const underscore = name.indexOf("_");
  if (underscore > 0) {
    const head = name.slice(0, underscore);
    const tail = name.slice(underscore + 1).replace(/_/g, "\\_");
    return `${base(head)}_{${/^\d+$/.test(tail) ? tail : `\\mathrm{${tail}}`}}`;
  }
  const digits = /^([A-Za-z]+?)(\d+)$/.exec(name);
  if (digits) return `${base(digits[1])}_{${digits[2]}}`;
  return base(name);
}

/** TeX of an internal-symbol tree, with the user's names put back. */
export function expressionToTex(node: MathNode, userNames: Map<string, string>): string {
  return node.toTex({
    parenthesis: "auto",
    implicit: "hide",
    handler: (n: MathNode, options: object) => {
      if (isSymbolNode(n) && userNames.has(n.name)) return `{${nameToTex(userNames.get(n.name)!)}}`;
      if (isFunctionNode(n) && n.fn.name === "ifle") {
        const [a, b, da, db] = n.args.map((x) => x.toTex(options));
        return `\\begin{cases} ${da} & ${a} \\le ${b} \\\\ ${db} & \\text{otherwise} \\end{cases}`;
      }
      if (isFunctionNode(n) && n.fn.name === "sign")
        return `\\operatorname{sgn}\\left(${n.args[0].toTex(options)}\\right)`;
      return undefined;
    },
  });
}

/** Plain text of an internal-symbol tree, with the user's names put back. */
export function expressionToText(node: MathNode, userNames: Map<string, string>): string {
  return node.toString({
    parenthesis: "auto",
    handler: (n: MathNode) => {
      if (isSymbolNode(n) && userNames.has(n.name)) return userNames.get(n.name)!;
      return undefined;
    },
  });
}
