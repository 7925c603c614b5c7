import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { Role } from '../../shared/roles.js';

@Entity({ name: 'users' })
export class User {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column({ type: 'text', unique: true }) email!: string;
  @Column({ type: 'text' }) name!: string;
  @Column({ name: 'password_hash', type: 'text', nullable: true }) passwordHash!: string | null;
  @Column({ name: 'google_id', type: 'text', nullable: true, unique: true }) googleId!: string | null;
  @Column({ name: 'email_verified_at', type: 'timestamptz', nullable: true }) emailVerifiedAt!: Date | null;
  @Column({ type: 'text', array: true, default: () => "'{subscriber}'" }) roles!: Role[];
  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' }) createdAt!: Date;
}
