// Review mails say "ok" for a stage only when every rating was checked; unchecked ratings are named.
import { describe, expect, it } from 'vitest';
import { ratingsWords, revisionSubmittedMail, type StageLine } from '@/lib/mail/review-mails';

const line = (over: Partial<StageLine>): StageLine => ({ name: 'Input stage', tubeDesignation: '12AX7', ratingProblems: 0, notChecked: [], error: null, ...over });

describe('ratings in review mails', () => {
  it('says ok only when all ratings were checked', () => {
    expect(ratingsWords(line({}))).toEqual({ text: 'all ratings checked and ok', tone: 'ok' });
  });

  it('names the ratings that were not checked instead of calling them ok', () => {
    const w = ratingsWords(line({ notChecked: ['Plate voltage', 'Plate dissipation'] }));
    expect(w.tone).toBe('unknown');
    expect(w.text).toBe('not checked (no rating on file): Plate voltage, Plate dissipation');
    expect(w.text).not.toMatch(/\bok\b/);
  });

  it('reports ratings over and unchecked ones together', () => {
    expect(ratingsWords(line({ ratingProblems: 2, notChecked: ['Screen voltage'] })).text).toBe('2 ratings over; not checked (no rating on file): Screen voltage');
  });

  it('writes the words into both the text and the HTML part', () => {
    const mail = revisionSubmittedMail({
      to: ['r@example.test'], projectName: 'Bench amp', number: 2, submitter: 'D', note: '', link: 'http://x/reviews/1', contentHash: 'ab',
      stages: [line({ notChecked: ['Plate voltage'] })],
    });
    expect(mail.text).toContain('Input stage (12AX7): not checked (no rating on file): Plate voltage');
    expect(mail.text).not.toContain('ratings ok');
    expect(mail.html).toContain('not checked (no rating on file): Plate voltage');
  });
});
