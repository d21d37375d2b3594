// BIDS channels files (BIDS specification, EEG/iEEG/MEG "Channels description (*_channels.tsv)": tab-separated,
// required columns `name` and `type`, optional `status` with the values `good`, `bad` or `n/a`, upper-case type
// codes such as EEG, EOG, ECG, EMG, MEGMAG, MEGGRADPLANAR, SEEG, ECOG, TRIG, MISC).
import { describe, expect, it } from 'vitest';
import { FormatError, parseBidsChannels } from '../../../../src/lib/formats';

describe('parseBidsChannels', () => {
  it('maps the specification type codes and reads status = bad', () => {
    const text = 'name\ttype\tunits\tstatus\tstatus_description\n' +
      'Fz\tEEG\tuV\tgood\tn/a\nVEOG\tVEOG\tuV\tgood\tn/a\nEKG\tECG\tuV\tn/a\tn/a\nChin\tEMG\tuV\tgood\tn/a\n' +
      'MEG0111\tMEGMAG\tT\tgood\tn/a\nMEG0112\tMEGGRADPLANAR\tT/m\tbad\tnoisy\nLA1\tSEEG\tuV\tBAD\tflat\nG1\tECOG\tuV\tgood\tn/a\n' +
      'STI014\tTRIG\tV\tgood\tn/a\nResp\tRESP\tn/a\tgood\tn/a\n';
    const { channels, warnings } = parseBidsChannels(text);
    expect(channels.map((c) => [c.name, c.type, c.bad])).toEqual([
      ['Fz', 'eeg', false], ['VEOG', 'eog', false], ['EKG', 'ecg', false], ['Chin', 'emg', false],
      ['MEG0111', 'meg-magnetometer', false], ['MEG0112', 'meg-gradiometer', true], ['LA1', 'intracranial', true],
      ['G1', 'intracranial', false], ['STI014', 'stimulus', false], ['Resp', 'other', false],
    ]);
    expect(warnings).toEqual([]);
  });

  it('reads a file without status as all good, and warns about a type code the specification does not list', () => {
    const { channels, warnings } = parseBidsChannels('name\ttype\tunits\nCz\teeg\tuV\nX1\tWHISKER\tuV\n');
    expect(channels.map((c) => [c.name, c.type, c.bad, c.bidsType])).toEqual([['Cz', 'eeg', false, 'EEG'], ['X1', 'other', false, 'WHISKER']]);
    expect(warnings).toEqual(['channel type "WHISKER" not in the BIDS lists: read as "other"']);
  });

  it.each([
    ['name\tunits\nCz\tuV\n', 'header at row 1: has no "type" column, which BIDS requires'],
    ['type\tunits\nEEG\tuV\n', 'header at row 1: has no "name" column, which BIDS requires'],
    ['name,type\nCz,EEG\n', 'header at row 1: is not tab-separated (BIDS channels files use tabs)'],
    ['name\ttype\tstatus\nCz\tEEG\tbroken\n', 'status at row 2 column "status": "broken" is not "good", "bad" or "n/a"'],
    ['name\ttype\nCz\tEEG\nCz\tEOG\n', 'name at row 3 column "name": "Cz" is listed twice (rows 2 and 3)'],
    ['name\ttype\nCz\n', 'row length at row 2: 1 cells, but the header names 2 columns'],
    ['', 'header at row 1: is missing: the channels file is empty'],
  ])('refuses %j naming the row', (text, message) => {
    expect(() => parseBidsChannels(text)).toThrow(FormatError);
    expect(() => parseBidsChannels(text)).toThrow(message);
  });
});
