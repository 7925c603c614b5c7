import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

/** A publisher's listing: what the catalogue shows; `publishedVersionId` names the version subscribers query. */
@Entity({ name: 'listings' })
export class Listing {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column({ name: 'publisher_id', type: 'uuid' }) publisherId!: string;
  @Column({ type: 'text', unique: true }) slug!: string;
  @Column({ type: 'text' }) title!: string;
  @Column({ type: 'text', default: '' }) summary!: string;
  @Column({ name: 'description_md', type: 'text', default: '' }) descriptionMd!: string;
  @Column({ type: 'text', array: true, default: () => "'{}'" }) tags!: string[];
  @Column({ type: 'text', default: '' }) licence!: string;
  @Column({ type: 'text', default: '' }) contact!: string;
  @Column({ name: 'published_version_id', type: 'uuid', nullable: true }) publishedVersionId!: string | null;
  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' }) createdAt!: Date;
  @UpdateDateColumn({ name: 'updated_at', type: 'timestamptz' }) updatedAt!: Date;
}
