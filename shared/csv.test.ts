import { describe, expect, it } from 'vitest';
import { csvDocument, csvField, csvRow, neutraliseFormula, runsAsFormula } from './csv';

// Cases from the OWASP "CSV Injection" page (cells starting with = + - @, tab, carriage return) and RFC 4180 quoting.
describe('CSV cells', () => {
  it.each(['=1+2', '+1+2', '-2+3', '@SUM(A1:A2)', '\t=1', '\r=1', '=HYPERLINK("http://x.example","a")', '-1+1|cmd'])('neutralises %j (OWASP CSV Injection)', (text) => {
    expect(runsAsFormula(text)).toBe(true);
    expect(neutraliseFormula(text)).toBe(`'${text}`);
  });

  it.each(['-1.25', '+3', '0.5', '-.5', '1e-3', '12', 'Mix water 0.18', 'L-2026-001'])('keeps %j as it is', (text) => {
    expect(runsAsFormula(text)).toBe(false);
    expect(neutraliseFormula(text)).toBe(text);
  });

  it('quotes per RFC 4180 after neutralising', () => {
    expect(csvField('=A1,B1')).toBe(`"'=A1,B1"`);
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('a\r\nb')).toBe('"a\r\nb"');
    expect(csvField(null)).toBe('');
    expect(csvField(-2.5)).toBe('-2.5');
    expect(csvField(Number.NaN)).toBe('');
    expect(csvRow(['a', 1, true])).toBe('a,1,true\r\n');
  });

  it('starts a document with the UTF-8 byte-order mark', () => {
    expect(csvDocument([['x'], ['é']])).toBe('\uFEFFx\r\né\r\n');
  });
});
