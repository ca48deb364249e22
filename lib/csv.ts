// One cell of CSV the product writes. Spreadsheet programs run a cell that begins with `=`, `+`,
// `-`, `@`, tab or carriage return as a formula, so such a cell is prefixed with a single quote
// and quoted (OWASP, "CSV Injection"). Plain numbers, negative ones included, stay numbers.

const FORMULA_START = /^[=+\-@\t\r]/;
const PLAIN_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export function csvCell(value: string): string {
  const neutralised = FORMULA_START.test(value) && !PLAIN_NUMBER.test(value);
  const text = neutralised ? `'${value}` : value;
  return neutralised || /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}
