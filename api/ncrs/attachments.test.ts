// What an NCR attachment may be, read from its bytes, and the name it is kept under.
import { describe, expect, it } from 'vitest';
import { attachmentType, MAX_FILE_NAME_CHARS, sanitiseFileName } from './attachments';

describe('attachmentType', () => {
  it('takes photos, PDFs and instrument text by their leading bytes, whatever the name', () => {
    // PDF header "%PDF-" (ISO 32000-1 §7.5.2); JPEG start-of-image FF D8 and a marker's FF (ITU-T T.81 Annex B).
    expect(attachmentType(Buffer.from('%PDF-1.7\n'), 'scan.png')).toBe('application/pdf');
    expect(attachmentType(Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0, 16]), 'photo.txt')).toBe('image/jpeg');
    expect(attachmentType(Buffer.from('time;flow mm\n06:10;152\n'), 'export.dat')).toBe('text/csv');
    expect(attachmentType(Buffer.from('Press 2 calibrated 04/12/2026\n'), 'log')).toBe('text/plain');
  });

  it('refuses programs, scripts, markup and unknown binaries with 415', () => {
    const refused = (bytes: Buffer) => {
      try {
        attachmentType(bytes, 'f.pdf');
        return null;
      } catch (err) {
        return (err as { status: number }).status;
      }
    };
    // Mach-O 64-bit magic FEEDFACF stored little-endian (Apple loader.h, from memory).
    expect(refused(Buffer.from([0xcf, 0xfa, 0xed, 0xfe, 7, 0, 0, 1]))).toBe(415);
    expect(refused(Buffer.from('  <html><body>hi</body></html>'))).toBe(415);
    expect(refused(Buffer.from('lot,value\n<script>alert(1)</script>\n'))).toBe(415);
    expect(refused(Buffer.from([1, 2, 0, 4]))).toBe(415);
    expect(refused(Buffer.from('lot,value\nL1,152\n'))).toBeNull();
  });
});

describe('sanitiseFileName', () => {
  it('keeps only the last part of a path, either slash', () => {
    expect(sanitiseFileName('../../etc/passwd.png')).toBe('passwd.png');
    expect(sanitiseFileName('C:\\Users\\lab\\Desktop\\flow.csv')).toBe('flow.csv');
    expect(sanitiseFileName('..')).toBe('attachment');
    expect(sanitiseFileName('.bashrc')).toBe('bashrc');
  });

  it('drops control and invisible format characters and keeps letters of any script', () => {
    expect(sanitiseFileName('Prüf\u0000bericht\u0007\u202e gpj.exe')).toBe('Prüfbericht gpj.exe');
    expect(sanitiseFileName('Ø Mörtel 試験.pdf')).toBe('Ø Mörtel 試験.pdf');
    expect(sanitiseFileName('a<b>:c?.txt')).toBe('a_b__c_.txt');
  });

  it('cuts a long name to the limit and keeps its extension', () => {
    const cut = sanitiseFileName(`${'ä'.repeat(300)}.pdf`);
    expect([...cut]).toHaveLength(MAX_FILE_NAME_CHARS);
    expect(cut.endsWith('ä.pdf')).toBe(true);
  });
});
