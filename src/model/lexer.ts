/**
 * A small lexer in front of the expression parser. The parser keeps no source positions and
 * accepts far more than keel does, so this pass rejects anything outside the grammar with the
 * column of the offending token before the parser ever sees the text.
 */
export type TokenKind = "number" | "name" | "op" | "compare" | "lparen" | "rparen" | "comma";

export interface Token {
  kind: TokenKind;
  text: string;
  /** 1-based column of the token's first character. */
  column: number;
}

export type LexResult = { ok: true; tokens: Token[] } | { ok: false; column: number; char: string };

const NUMBER = /^(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/;
const NAME = /^[A-Za-z_][A-Za-z0-9_]*/;

export function lexExpression(text: string, allowComparison: boolean): LexResult {
  const tokens: Token[] = [];
  let i = 0;
  while (i < text.length) {
    const ch = text[i];
    const column = i + 1;
    if (ch === " " || ch === "\t") {
      i++;
      continue;
    }
    const rest = text.slice(i);
    const num = NUMBER.exec(rest);
    if (num) {
      tokens.push({ kind: "number", text: num[0], column });
      i += num[0].length;
      continue;
    }
    const name = NAME.exec(rest);
    if (name) {
      tokens.push({ kind: "name", text: name[0], column });
      i += name[0].length;
      continue;
    }
    if (ch === "*" && rest[1] === "*") {
      // `**` is a power, as in many programming languages; parseExpression hands the parser `^`
      tokens.push({ kind: "op", text: "**", column });
      i += 2;
      continue;
    }
    if ("+-*/^".includes(ch)) tokens.push({ kind: "op", text: ch, column });
    else if (ch === "(") tokens.push({ kind: "lparen", text: ch, column });
    else if (ch === ")") tokens.push({ kind: "rparen", text: ch, column });
    else if (ch === ",") tokens.push({ kind: "comma", text: ch, column });
    else if (allowComparison && (ch === "<" || ch === ">")) {
      const text2 = rest[1] === "=" ? ch + "=" : ch;
      tokens.push({ kind: "compare", text: text2, column });
      i += text2.length;
      continue;
    } else return { ok: false, column, char: ch };
    i++;
  }
  return { ok: true, tokens };
}
