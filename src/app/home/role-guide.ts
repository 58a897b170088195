import type { Role } from '@shared/roles';

/** What the overview page tells each role about its part in Tendara. */
export interface RoleGuide {
  summary: string;
  tasks: readonly { icon: string; title: string; text: string }[];
  /** Buyers and compliance officers make or check award decisions, so they see the caution. */
  showsAwardCaution: boolean;
}

export const ROLE_GUIDES: Record<Role, RoleGuide> = {
  admin: {
    summary: 'You look after the people who use Tendara and the mail it sends.',
    tasks: [
      { icon: 'person_add', title: 'Invite people', text: 'Add buyers, compliance officers and vendors; each gets an e-mail with a link to set a password.' },
      { icon: 'manage_accounts', title: 'Keep roles right', text: 'Deactivate people who leave — their sessions end at once — and bring them back when needed.' },
      { icon: 'outbox', title: 'Check the outbox', text: 'Read every e-mail Tendara has sent: invitations now, award notices later.' },
    ],
    showsAwardCaution: false,
  },
  buyer: {
    summary: 'You run tenders from set-up to award notices.',
    tasks: [
      { icon: 'edit_note', title: 'Set up tenders', text: 'Describe the contract, its delivery regions and forecast quantities, and invite vendors.' },
      { icon: 'table_chart', title: 'Read the bids', text: 'After the closing time, the bid tabulation shows every fixed fee, unit price and capacity cap.' },
      { icon: 'balance', title: 'Build the award', text: 'Run award scenarios under the tender rules, compare split and sole awards, and recommend one with a justification.' },
      { icon: 'send', title: 'Notify bidders', text: 'Send award notices and regret letters, with the standstill period before signature.' },
    ],
    showsAwardCaution: true,
  },
  compliance: {
    summary: 'You check award decisions before they go out.',
    tasks: [
      { icon: 'compare', title: 'Compare scenarios', text: 'See what each rule costs, above all sole award against split award.' },
      { icon: 'fact_check', title: 'Approve or return', text: "Approve a buyer's recommendation or return it with your reasons — never one you made yourself." },
      { icon: 'history', title: 'Read the audit trail', text: 'Who decided what and when, and proof that bids stayed sealed until closing.' },
    ],
    showsAwardCaution: true,
  },
  vendor: {
    summary: 'You bid on the tenders you are invited to.',
    tasks: [
      { icon: 'mail', title: 'See your invitations', text: 'Each tender lists its regions, forecast quantities and closing time.' },
      { icon: 'upload_file', title: 'Bid', text: 'Quote your fixed fee, a unit price per region and your capacity cap, by form or workbook; revise or withdraw until closing.' },
      { icon: 'receipt_long', title: 'Keep your receipt', text: 'Every submitted bid gets a receipt; after the award you read your notice here.' },
    ],
    showsAwardCaution: false,
  },
};
