import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Run } from './run.entity';

/**
 * An expiring link that shows a customer the rebuild record of one run (issue 8). Only the token's sha256 is stored,
 * so a database read cannot open a record. Unlike a one-time token it is read as often as the customer likes until
 * it expires, and it belongs to a run, not to an account. No customer data is kept here: the address is read from
 * the job when the mail is sent.
 */
export const CustomerRecordLink = defineEntity({
	name: 'CustomerRecordLink',
	tableName: 'customer_record_link',
	properties: {
		id: p.uuid().primary(),
		run: () => p.manyToOne(Run).index(),
		tokenHash: p.string().length(64).unique(),
		expiresAt: p.datetime(),
		createdById: p.uuid(),
		createdAt: p.datetime().onCreate(() => new Date())
	}
});
export type ICustomerRecordLink = InferEntity<typeof CustomerRecordLink>;
