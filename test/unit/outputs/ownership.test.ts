/**
 * Tests of the ownership rule shared by the command line and the editor (core/outputs/ownership.ts):
 * a file is Knotwise's only when the fit record beside it lists its name with the SHA-256
 * of its current bytes (or a commit marker vouches for those bytes); the record itself counts
 * by its format field. Hash values: the SHA-256 of "abc" is the example of FIPS 180-2,
 * appendix B.1.
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { recordedFiles, writtenByKnotwise } from '../../../core/outputs/ownership';
import { RECORD_FORMAT } from '../../../core/outputs/record';

/** SHA-256("abc"), FIPS 180-2 appendix B.1. */
const ABC = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';

const record = (files: Record<string, string>, format = RECORD_FORMAT): string => {
  const [first, ...rest] = Object.entries(files);
  return JSON.stringify({ format, table: first ? { file: first[0], sha256: first[1] } : null, outputs: rest.map(([file, sha256]) => ({ kind: 'c', file, sha256 })) });
};

describe('writtenByKnotwise', () => {
  it('the FIPS 180-2 example hash is what node:crypto gives for "abc" (the rule compares such hashes)', () => {
    assert.equal(createHash('sha256').update('abc').digest('hex'), ABC);
  });

  it('writtenByKnotwise: a file that does not exist is free to write', () => {
    assert.equal(writtenByKnotwise({ name: 'a.curve.csv', sha256: undefined, isRecord: false }, undefined), true);
  });

  it("writtenByKnotwise: a listed file is Knotwise's only while its bytes hash to the listed SHA-256", () => {
    const rec = record({ 'a.curve.csv': ABC, 'a.curve.h': '0'.repeat(64) });
    assert.equal(writtenByKnotwise({ name: 'a.curve.csv', sha256: ABC, isRecord: false }, rec), true);
    assert.equal(writtenByKnotwise({ name: 'a.curve.csv', sha256: '1'.repeat(64), isRecord: false }, rec), false, 'edited by hand');
    assert.equal(writtenByKnotwise({ name: 'b.curve.csv', sha256: ABC, isRecord: false }, rec), false, 'same bytes under another name');
    assert.equal(writtenByKnotwise({ name: 'a.curve.h', sha256: '0'.repeat(64), isRecord: false }, rec), true, 'other outputs count too');
  });

  it("writtenByKnotwise: without a record, or with a record of another format or not JSON, an existing file is not Knotwise's", () => {
    const t = { name: 'a.curve.csv', sha256: ABC, isRecord: false };
    assert.equal(writtenByKnotwise(t, undefined), false);
    assert.equal(writtenByKnotwise(t, record({ 'a.curve.csv': ABC }, 'something-else')), false);
    assert.equal(writtenByKnotwise(t, '{ not json'), false);
    assert.equal(writtenByKnotwise(t, 'null'), false);
  });

  it('writtenByKnotwise: the record itself counts by its format field', () => {
    assert.equal(writtenByKnotwise({ name: 'a.fit.json', sha256: ABC, isRecord: true }, record({})), true);
    assert.equal(writtenByKnotwise({ name: 'a.fit.json', sha256: ABC, isRecord: true }, '{"format": "mine"}'), false);
  });

  it("writtenByKnotwise: bytes a commit marker vouches for (an interrupted write) are Knotwise's, by name and SHA-256", () => {
    const vouched = new Map([['a.curve.csv', ABC]]);
    assert.equal(writtenByKnotwise({ name: 'a.curve.csv', sha256: ABC, isRecord: false }, undefined, vouched), true, 'even without a record');
    assert.equal(writtenByKnotwise({ name: 'a.curve.csv', sha256: '1'.repeat(64), isRecord: false }, undefined, vouched), false, 'other bytes');
    assert.equal(writtenByKnotwise({ name: 'b.curve.csv', sha256: ABC, isRecord: false }, undefined, vouched), false, 'another name');
  });

  it('recordedFiles lists the table and every output by name, skipping malformed entries', () => {
    const rec = { table: { file: 't.csv', sha256: ABC }, outputs: [{ file: 'h.h', sha256: 'x' }, { file: 3 }, null] };
    assert.deepEqual(
      [...recordedFiles(rec).entries()],
      [
        ['t.csv', ABC],
        ['h.h', 'x'],
      ],
    );
    assert.deepEqual([...recordedFiles(null).entries()], []);
  });
});
