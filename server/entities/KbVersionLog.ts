import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

/** One line of a version's job log (stage changes, retries, cancellation, clean-up), shown on the version page. */
@Entity({ name: 'kb_version_log' })
export class KbVersionLog {
  @PrimaryGeneratedColumn({ type: 'bigint' }) id!: string;
  @Column({ name: 'version_id', type: 'uuid' }) versionId!: string;
  @Column({ type: 'timestamptz' }) at!: Date;
  @Column({ type: 'text' }) level!: string;
  @Column({ type: 'text' }) message!: string;
}
