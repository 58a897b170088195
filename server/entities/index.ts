import { AccountToken } from './account-token.entity';
import { MailMessage } from './mail-message.entity';
import { User } from './user.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/** Every entity MikroORM knows; add new ones here. */
export const ENTITIES = [VendorOrganisation, User, AccountToken, MailMessage];
export { AccountToken, MailMessage, User, VendorOrganisation };
