import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';

/** A Stripe invoice as Thence books it: amount split into the platform fee and the publisher's share. */
@Entity({ name: 'invoices' })
export class Invoice {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column({ name: 'subscription_id', type: 'uuid' }) subscriptionId!: string;
  @Column({ name: 'listing_id', type: 'uuid' }) listingId!: string;
  @Column({ name: 'stripe_invoice_id', type: 'text', unique: true }) stripeInvoiceId!: string;
  @Column({ type: 'text' }) status!: 'paid' | 'failed';
  @Column({ name: 'amount_cents', type: 'integer' }) amountCents!: number;
  @Column({ type: 'text' }) currency!: string;
  @Column({ name: 'platform_fee_cents', type: 'integer' }) platformFeeCents!: number;
  @Column({ name: 'publisher_share_cents', type: 'integer' }) publisherShareCents!: number;
  @Column({ name: 'period_start', type: 'timestamptz', nullable: true }) periodStart!: Date | null;
  @Column({ name: 'period_end', type: 'timestamptz', nullable: true }) periodEnd!: Date | null;
  @Column({ name: 'paid_at', type: 'timestamptz', nullable: true }) paidAt!: Date | null;
  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' }) createdAt!: Date;
}
