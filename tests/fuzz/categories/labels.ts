/**
 * hostile-labels: free text that would act if a dossier obeyed it: markup and script (OWASP
 * Cross-Site Scripting Prevention Cheat Sheet), CSS url( and @import, javascript: links, TeX
 * commands that link or include, template syntax, bidirectional controls (CVE-2021-42574) and
 * terminal escapes (ECMA-48). Each payload names the host fuzz.invalid (RFC 2606 reserves .invalid),
 * so a request or a link that survives is easy to find.
 */
import { baseSpec, specCase, specText, type CommandName, type FuzzCase } from "../base.js";
import { setAt, type JsonPath } from "../mutate.js";

const C = "hostile-labels";
export const HOSTILE_HOST = "fuzz.invalid";

export const PAYLOADS: string[] = [
  "<script>alert(1)</script>",
  "<img src=x onerror=alert(2)>",
  "<svg onload=alert(3)><circle r=1 /></svg>",
  '"><script>alert(4)</script>',
  "'><img src=https://fuzz.invalid/i.png>",
  "</style><script>alert(5)</script>",
  "</title><script>alert(6)</script>",
  '<a href="javascript:alert(7)">click</a>',
  "javascript:alert(8)",
  "url(https://fuzz.invalid/u.png)",
  "x;background:url(https://fuzz.invalid/bg.png)",
  "@import url(https://fuzz.invalid/s.css);",
  "<style>body{background:url(https://fuzz.invalid/z.png)}</style>",
  "<link rel=stylesheet href=https://fuzz.invalid/l.css>",
  "<iframe src=https://fuzz.invalid/f></iframe>",
  '<meta http-equiv="refresh" content="0;url=https://fuzz.invalid/m">',
  "<base href=https://fuzz.invalid/>",
  "<object data=https://fuzz.invalid/o></object>",
  "\\href{javascript:alert(9)}{x}",
  "\\url{https://fuzz.invalid/t}",
  "$\\includegraphics{https://fuzz.invalid/g.png}$",
  "$x$ \\(\\href{https://fuzz.invalid}{y}\\)",
  "{{constructor.constructor('alert(10)')()}}",
  "{{{title}}} {{> layout}}",
  "\u001b[2J\u001b[31mred\u001b]8;;https://fuzz.invalid/\u001b\\link\u001b]8;;\u001b\\",
  "\u001b]0;window title\u0007\u0008\u0008",
  "\u202eelif.exe\u202c and \u2066isolate\u2069 \u200f\u200e",
  "\u200b\u200c\u200d\ufeffzero-width",
  "line\u2028separator\u2029paragraph",
  "&lt;script&gt;alert(11)&lt;/script&gt; &#60;b&#62;",
  "<!-- comment --><![CDATA[x]]>",
  "<math><mtext><img src=x onerror=alert(12)></mtext></math>",
];

/** Where free text goes: cover, tables, scenarios, assumptions, cautions, claims, units. */
const FIELDS: JsonPath[] = [
  ["title"],
  ["authors", 0],
  ["organisation"],
  ["purpose"],
  ["states", 0, "label"],
  ["states", 1, "unit"],
  ["parameters", 0, "label"],
  ["parameters", 1, "source"],
  ["parameters", 2, "unit"],
  ["time", "unit"],
  ["scenarios", 0, "label"],
  ["scenarios", 0, "name"],
  ["assumptions", 0, "text"],
  ["cautions", 0],
  ["claims", 0, "text"],
];

/** The payload in one field; every third case is built to HTML and checked, a few to PDF. */
function oneField(): FuzzCase[] {
  return PAYLOADS.map((payload, k) => {
    const field = FIELDS[k % FIELDS.length];
    const spec = baseSpec();
    setAt(spec, field, payload);
    const command: CommandName = k % 8 === 5 ? "buildPdf" : k % 3 === 0 ? "build" : "check";
    return specCase(C, `${k} payload in ${field.join(".")} (${command})`, specText(spec), command);
  });
}

/** Every payload in every field at once, built; a few of these open in Chromium. */
function everyField(): FuzzCase[] {
  const cases: FuzzCase[] = [];
  for (let k = 0; k < PAYLOADS.length; k += 4) {
    const group = PAYLOADS.slice(k, k + 4).join(" ");
    const spec = baseSpec();
    for (const field of FIELDS) setAt(spec, field, `${field.join(".")}: ${group}`);
    const command: CommandName = k % 16 === 8 ? "buildPdf" : "build";
    cases.push(
      specCase(C, `payloads ${k}-${k + 3} in every field (${command})`, specText(spec), command, {
        browser: k % 8 === 0,
      }),
    );
  }
  return cases;
}

export function hostileLabelCases(): FuzzCase[] {
  return [...oneField(), ...everyField()];
}
