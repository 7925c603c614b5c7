import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';

export const VERSION_STATUSES = ['queued', 'processing', 'ready', 'failed', 'inconsistent', 'cancelled'] as const;
export type VersionStatus = (typeof VERSION_STATUSES)[number];

/** One knowledge-base version of a listing; servable only when status is 'ready'. Facts live in kb_facts_<storeKey>. */
@Entity({ name: 'kb_versions' })
export class KbVersion {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column({ name: 'listing_id', type: 'uuid' }) listingId!: string;
  @Column({ type: 'integer' }) number!: number;
  @Column({ name: 'store_key', type: 'integer', unique: true }) storeKey!: number;
  @Column({ type: 'text' }) status!: VersionStatus;
  @Column({ type: 'text', nullable: true }) stage!: string | null;
  @Column({ type: 'real' }) progress!: number;
  @Column({ type: 'text' }) mode!: 'strict' | 'approximate';
  @Column({ type: 'jsonb', nullable: true }) profile!: unknown;
  @Column({ type: 'jsonb', nullable: true }) rewriting!: unknown;
  @Column({ type: 'text', nullable: true }) program!: string | null;
  @Column({ type: 'jsonb', nullable: true }) counts!: unknown;
  @Column({ type: 'jsonb', nullable: true }) diagnostics!: unknown;
  @Column({ type: 'jsonb', nullable: true }) explanation!: unknown;
  @Column({ type: 'jsonb', nullable: true }) timings!: unknown;
  @Column({ name: 'fact_count', type: 'bigint', nullable: true }) factCount!: string | null;
  @Column({ name: 'job_id', type: 'text', nullable: true }) jobId!: string | null;
  @Column({ type: 'integer' }) attempts!: number;
  @Column({ name: 'cancel_requested', type: 'boolean' }) cancelRequested!: boolean;
  @Column({ name: 'heartbeat_at', type: 'timestamptz', nullable: true }) heartbeatAt!: Date | null;
  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' }) createdAt!: Date;
  @Column({ name: 'started_at', type: 'timestamptz', nullable: true }) startedAt!: Date | null;
  @Column({ name: 'finished_at', type: 'timestamptz', nullable: true }) finishedAt!: Date | null;
  @Column({ type: 'text', nullable: true }) error!: string | null;
}
