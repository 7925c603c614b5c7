import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

export type SubscriptionStatus = 'pending' | 'active' | 'past_due' | 'canceled';

/** A subscriber's access to one listing under one plan; paid ones mirror a Stripe subscription. */
@Entity({ name: 'subscriptions' })
export class Subscription {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column({ name: 'subscriber_id', type: 'uuid' }) subscriberId!: string;
  @Column({ name: 'listing_id', type: 'uuid' }) listingId!: string;
  @Column({ name: 'plan_id', type: 'uuid' }) planId!: string;
  @Column({ type: 'text' }) status!: SubscriptionStatus;
  @Column({ name: 'stripe_customer_id', type: 'text', nullable: true }) stripeCustomerId!: string | null;
  @Column({ name: 'stripe_subscription_id', type: 'text', nullable: true }) stripeSubscriptionId!: string | null;
  @Column({ name: 'stripe_checkout_session_id', type: 'text', nullable: true }) stripeCheckoutSessionId!: string | null;
  @Column({ name: 'current_period_start', type: 'timestamptz', nullable: true }) currentPeriodStart!: Date | null;
  @Column({ name: 'current_period_end', type: 'timestamptz', nullable: true }) currentPeriodEnd!: Date | null;
  @Column({ name: 'cancel_at_period_end', type: 'boolean', default: false }) cancelAtPeriodEnd!: boolean;
  @Column({ name: 'canceled_at', type: 'timestamptz', nullable: true }) canceledAt!: Date | null;
  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' }) createdAt!: Date;
  @UpdateDateColumn({ name: 'updated_at', type: 'timestamptz' }) updatedAt!: Date;
}
