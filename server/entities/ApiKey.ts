import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';

/** A subscription's API key: the prefix finds the row, the secret is kept only as its SHA-256. */
@Entity({ name: 'api_keys' })
export class ApiKey {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column({ name: 'subscription_id', type: 'uuid' }) subscriptionId!: string;
  @Column({ type: 'text' }) name!: string;
  @Column({ type: 'text', unique: true }) prefix!: string;
  @Column({ name: 'secret_sha256', type: 'text' }) secretSha256!: string;
  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' }) createdAt!: Date;
  @Column({ name: 'last_used_at', type: 'timestamptz', nullable: true }) lastUsedAt!: Date | null;
  @Column({ name: 'revoked_at', type: 'timestamptz', nullable: true }) revokedAt!: Date | null;
}
