import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { AUDIT_WORDS, describeEntry, type AuditNames } from '../../server/services/audit-words';

const none: AuditNames = { bidVendors: new Map(), runScenarios: new Map(), organisations: new Map() };

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) return name === 'migrations' ? [] : sources(path);
    return path.endsWith('.ts') ? [path] : [];
  });
}

/**
 * Every action code the server can write: quoted `'area.verb'` literals beside an `action` (direct,
 * or in a conditional), and the codes passed to the bid helper. A code added without words fails here.
 */
function writtenActions(): string[] {
  const found = new Set<string>();
  for (const file of sources(join(__dirname, '../../server'))) {
    const text = readFileSync(file, 'utf8');
    for (const line of text.split('\n')) {
      if (!/action\b|auditBid\(/.test(line)) continue;
      for (const m of line.matchAll(/'([a-z]+\.[a-z-]+)'/g)) found.add(m[1]);
    }
    // `recommendation.${decision}` with decision 'approved' | 'returned'
    if (text.includes('action: `recommendation.${decision}`')) ['recommendation.approved', 'recommendation.returned'].forEach((a) => found.add(a));
  }
  return [...found].sort();
}

test('every audit action the server writes has words, so no trail shows a bare code', () => {
  const actions = writtenActions();
  // At least the tender life, bids, decisions and administration (a scan that found nothing would pass vacuously).
  expect(actions).toEqual(expect.arrayContaining(['tender.published', 'bid.submitted', 'recommendation.approved', 'person.invited']));
  expect(actions.filter((a) => !(a in AUDIT_WORDS))).toEqual([]);
});

test('entries read as sentences with the names looked up, and a bid names no vendor without a lookup (sealed)', () => {
  const bid = { action: 'bid.revised', subject: 'bid 5d3c9f2e-8a1b-4c7d-9e0f-123456789abc', detail: { revision: 3 } };
  expect(describeEntry(bid, none)).toBe('Revised bid received (revision 3)');
  const named = { ...none, bidVendors: new Map([['5d3c9f2e-8a1b-4c7d-9e0f-123456789abc', 'Kestrelway Haulage']]) };
  expect(describeEntry(bid, named)).toBe('Revised bid received from Kestrelway Haulage (revision 3)');
  expect(describeEntry({ action: 'tender.closed', subject: 'tender', detail: { submittedBids: 4 } }, none)).toBe('Bidding closed; 4 bids opened');
  expect(describeEntry({ action: 'bid.excluded', subject: 'bid x', detail: { vendor: 'Arden Minerals', ground: 'late', note: 'Arrived after closing.' } }, none))
    .toBe('Bid from Arden Minerals excluded (late): Arrived after closing.');
  expect(describeEntry({ action: 'notices.queued', subject: '3 notices', detail: { award: 2, regret: 1, exclusion: 0 } }, none))
    .toBe('Notices queued for sending: 2 award notices, 1 regret notice');
  expect(describeEntry({ action: 'person.invited', subject: 'person', detail: { name: 'Ada Quill', email: 'ada@example.test', vendorOrganisation: { name: 'Quill Freight' } } }, none))
    .toBe('Invited Ada Quill <ada@example.test>, Quill Freight');
});
