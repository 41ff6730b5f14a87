import { TestBed } from '@angular/core/testing';
import { buildCsv, csvCell } from './csv';
import { CsvExportButton } from './csv-export-button';

describe('CSV builder', () => {
  it('quotes cells holding commas, quotes or line breaks, doubling the quotes (RFC 4180)', () => {
    expect(csvCell('Energy, on-peak')).toBe('"Energy, on-peak"');
    expect(csvCell('the "big" bus')).toBe('"the ""big"" bus"');
    expect(csvCell('two\nlines')).toBe('"two\nlines"');
    expect(csvCell(' padded ')).toBe('" padded "');
    expect(csvCell('plain')).toBe('plain');
  });

  it('writes numbers plainly (no grouping, no currency sign) and leaves missing values empty', () => {
    expect(csvCell(1234.5)).toBe('1234.5');
    expect(csvCell(-12.25)).toBe('-12.25');
    expect(csvCell(0.1 + 0.2)).toBe('0.3');
    expect(csvCell(-0)).toBe('0');
    expect(csvCell(null)).toBe('');
    expect(csvCell(undefined)).toBe('');
    expect(csvCell(Number.NaN)).toBe('');
  });

  it('keeps text a spreadsheet would run as a formula as text', () => {
    expect(csvCell('=SUM(A1:A2)')).toBe("'=SUM(A1:A2)");
    expect(csvCell('@cmd')).toBe("'@cmd");
    expect(csvCell(-5)).toBe('-5');
  });

  it('starts with the header row, pads short rows and ends every line with CRLF', () => {
    const text = buildCsv({
      header: ['Night', 'Plan cost (USD)', 'Note'],
      rows: [
        ['2026-12-01', 120.5, 'ok'],
        ['2026-12-02', 1100],
      ],
    });
    expect(text).toBe('Night,Plan cost (USD),Note\r\n2026-12-01,120.5,ok\r\n2026-12-02,1100,\r\n');
  });

  it('downloads the file through a Blob with the given name', async () => {
    const blobs: Blob[] = [];
    const create = vi.spyOn(URL, 'createObjectURL').mockImplementation((b) => {
      blobs.push(b as Blob);
      return 'blob:test';
    });
    const revoke = vi.spyOn(URL, 'revokeObjectURL').mockImplementation(() => undefined);
    const names: string[] = [];
    const click = vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(function (this: HTMLAnchorElement) {
      names.push(this.download);
    });
    const fixture = TestBed.createComponent(CsvExportButton);
    fixture.componentRef.setInput('table', { header: ['Bus', 'Cost (USD)'], rows: [['201', 7.2]] });
    fixture.componentRef.setInput('fileName', 'costs-night-2026-12-01-buses.csv');
    fixture.componentRef.setInput('what', 'the cost per bus');
    await fixture.whenStable();
    const button = (fixture.nativeElement as HTMLElement).querySelector('button')!;
    expect(button.textContent?.replace(/\s+/g, ' ')).toContain('Export CSV of the cost per bus');
    button.click();
    expect(names).toEqual(['costs-night-2026-12-01-buses.csv']);
    expect(blobs[0]!.type).toBe('text/csv;charset=utf-8');
    expect(await blobs[0]!.text()).toBe('Bus,Cost (USD)\r\n201,7.2\r\n');
    create.mockRestore();
    revoke.mockRestore();
    click.mockRestore();
  });
});
