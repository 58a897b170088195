import { AccountToken } from './account-token.entity';
import { Amendment } from './amendment.entity';
import { AuditEntry } from './audit-entry.entity';
import { Bid } from './bid.entity';
import { BidDocument } from './bid-document.entity';
import { BidLine } from './bid-line.entity';
import { BidRemovedLine } from './bid-removed-line.entity';
import { Contract } from './contract.entity';
import { ContractLine } from './contract-line.entity';
import { Invitation } from './invitation.entity';
import { MailMessage } from './mail-message.entity';
import { Notice } from './notice.entity';
import { NotificationSent } from './notification-sent.entity';
import { NotificationSetting } from './notification-setting.entity';
import { OpeningRecord } from './opening-record.entity';
import { Question } from './question.entity';
import { Recommendation } from './recommendation.entity';
import { Region } from './region.entity';
import { Run } from './run.entity';
import { RunAward } from './run-award.entity';
import { RunDebrief } from './run-debrief.entity';
import { RunExplanation } from './run-explanation.entity';
import { RunRegionCheck } from './run-region-check.entity';
import { Scenario } from './scenario.entity';
import { SeenMark } from './seen-mark.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/** Every entity MikroORM knows; add new ones here. */
export const ENTITIES = [VendorOrganisation, User, AccountToken, MailMessage, Tender, Region, Invitation, Bid, BidLine, BidDocument,
  Scenario, Run, RunAward, Recommendation, AuditEntry, Notice, OpeningRecord, Question, Amendment, BidRemovedLine, RunExplanation, RunDebrief, RunRegionCheck, Contract, ContractLine,
  NotificationSent, NotificationSetting, SeenMark];
export {
  AccountToken, Amendment, Contract, NotificationSent, NotificationSetting, ContractLine, AuditEntry, BidRemovedLine, Question, Notice, OpeningRecord, Recommendation, Run, RunAward, RunDebrief, RunExplanation, RunRegionCheck, Scenario, SeenMark, Bid, BidDocument, BidLine, Invitation, MailMessage, Region, Tender, User, VendorOrganisation,
};
