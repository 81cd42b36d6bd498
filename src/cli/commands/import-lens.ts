// `straylight import-lens`: a prescription table (surface, radius, thickness, n_d, V_d,
// semi-diameter) turned into a lens file, with its focal length and f-number worked out.

import { existsSync } from 'node:fs';
import path from 'node:path';
import type { Command } from 'commander';
import { InputError, ShotError, UsageError, whyNotReadable, type Diagnostic } from '../../errors.js';
import { readTextFile } from '../../io/load-shot.js';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { focalLength, backFocalDistance, stopHeightRatio } from '../../optics/paraxial.js';
import { stopIndex } from '../../optics/lens.js';
import { parseLensText } from '../../shot/lens-file.js';
import { parsePrescription, prescriptionLensText } from '../../shot/prescription.js';
import type { CommandContext } from '../context.js';
import { numberIn, requireExtension } from '../options.js';

export function registerImportLens(program: Command, { io }: CommandContext): void {
  program
    .command('import-lens')
    .description('turn a prescription table (surface, radius, thickness, n_d, V_d, semi-diameter) into a lens file')
    .argument('<table>', 'the table: .csv, or .txt with columns separated by spaces')
    .requiredOption('-o, --out <lens.yaml>', 'the lens file to write')
    .option('--name <name>', "the lens's name (default: the table's file name)")
    .option('--sensor-width <mm>', 'the sensor width the lens covers, mm', numberIn('--sensor-width', 1, 200), 36)
    .option('--f-number-min <n>', "the widest f-number (default: from the stop's semi-diameter)", numberIn('--f-number-min', 0.5, 64))
    .option('--force', 'replace a lens file already there')
    .action((table: string, opts: { out: string; name?: string; sensorWidth: number; fNumberMin?: number; force?: boolean }) => {
      requireExtension('--out', opts.out, ['.yaml', '.yml']);
      const out = path.resolve(opts.out);
      checkWritableFolder(path.dirname(out));
      if (existsSync(out) && !opts.force) throw new InputError(`${opts.out} exists; give --force to replace it (nothing was written)`);
      let text: string;
      try {
        text = readTextFile(table);
      } catch (e) {
        throw new InputError(`${table}: cannot read the table: ${whyNotReadable(e)}`);
      }
      const diagnostics: Diagnostic[] = [];
      const rows = parsePrescription(text, table, diagnostics);
      if (!rows) throw new ShotError(diagnostics, 'nothing was written');
      const name = opts.name ?? path.basename(table).replace(/\.[^.]*$/, '');
      if (!/^[A-Za-z0-9][A-Za-z0-9._-]*$/.test(name)) throw new UsageError(`--name: expected letters, digits, ".", "_" or "-", found "${name}"`);
      const source = path.basename(table);
      const draft = prescriptionLensText(rows, { name, source, sensorWidthMm: opts.sensorWidth, fNumberMin: opts.fNumberMin ?? 2 });
      const parsed = parseLensText(draft, opts.out, name);
      // a problem of a surface (a lens that could not be built) is located at its row of the table
      const atRow = (d: Diagnostic): Diagnostic => {
        const k = Number(/^surfaces\[(\d+)\]/.exec(d.path)?.[1]);
        const line = rows[k]?.line;
        return line ? { ...d, path: `row ${k + 1}`, loc: { file: table, line, col: 1 } } : { ...d, loc: { file: table, line: 1, col: 1 } };
      };
      if (!parsed.model) throw new ShotError(parsed.diagnostics.map(atRow), 'nothing was written');
      const f = focalLength(parsed.model);
      if (!(f > 0) || !Number.isFinite(f)) throw new InputError(`${table}: the lens has no positive focal length (paraxial f = ${f.toFixed(3)} mm); straylight draws flares of lenses that form an image`);
      let fNumber = opts.fNumberMin;
      if (fNumber === undefined) {
        const stop = stopIndex(parsed.model);
        const sd = rows.find((r) => r.stop)!.semiDiameterMm;
        if (!(sd > 0)) throw new UsageError(`${table}: the stop row gives no semi-diameter; give --f-number-min`);
        // the entrance pupil's radius is the stop's semi-diameter over the marginal ray's height ratio
        fNumber = f / ((2 * sd) / stopHeightRatio(parsed.model, stop));
      }
      const finalText = prescriptionLensText(rows, { name, source, sensorWidthMm: opts.sensorWidth, fNumberMin: fNumber });
      writeOutputFile(out, Buffer.from(finalText));
      io.stdout(`${opts.out}: ${name}, ${rows.length} surfaces, f = ${f.toFixed(3)} mm, back focus ${backFocalDistance(parsed.model).toFixed(3)} mm, f/${fNumber.toFixed(2)}\n`);
    });
}
