import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

/** A listing's offer: free or paid (monthly), with a monthly request quota and a per-minute rate limit. */
@Entity({ name: 'plans' })
export class Plan {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column({ name: 'listing_id', type: 'uuid' }) listingId!: string;
  @Column({ type: 'text' }) name!: string;
  @Column({ type: 'text', default: '' }) description!: string;
  @Column({ type: 'text' }) kind!: 'free' | 'paid';
  @Column({ name: 'price_cents', type: 'integer', default: 0 }) priceCents!: number;
  @Column({ type: 'text', default: 'eur' }) currency!: string;
  @Column({ name: 'monthly_quota', type: 'integer' }) monthlyQuota!: number;
  @Column({ name: 'rate_per_minute', type: 'integer' }) ratePerMinute!: number;
  @Column({ name: 'stripe_product_id', type: 'text', nullable: true }) stripeProductId!: string | null;
  @Column({ name: 'stripe_price_id', type: 'text', nullable: true }) stripePriceId!: string | null;
  @Column({ name: 'archived_at', type: 'timestamptz', nullable: true }) archivedAt!: Date | null;
  @Column({ type: 'integer', default: 0 }) position!: number;
  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' }) createdAt!: Date;
  @UpdateDateColumn({ name: 'updated_at', type: 'timestamptz' }) updatedAt!: Date;
}
