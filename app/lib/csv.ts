import { stringify, type Input, type Options } from "csv-stringify/sync";

/**
 * CSV meant to be opened in a spreadsheet. A text cell that starts with = + - @, a tab or a
 * carriage return (or their full-width forms) would be read as a formula there, so
 * csv-stringify's `escape_formulas` puts a ' before it (the OWASP "CSV injection" advice);
 * numbers are left alone, so a negative reading stays a number. Every export goes through here.
 */
export function spreadsheetCsv(records: Input, options: Omit<Options, "escape_formulas"> = {}): string {
  return stringify(records, { ...options, escape_formulas: true });
}
