import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';

/** An uploaded original (ontology or dataset), kept on disk under config.uploadDir for the publisher to download. */
@Entity({ name: 'kb_files' })
export class KbFile {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column({ name: 'version_id', type: 'uuid' }) versionId!: string;
  @Column({ type: 'text' }) role!: 'ontology' | 'dataset';
  @Column({ type: 'integer' }) position!: number;
  @Column({ name: 'original_name', type: 'text' }) originalName!: string;
  @Column({ name: 'stored_path', type: 'text' }) storedPath!: string;
  @Column({ type: 'text' }) format!: string;
  @Column({ name: 'size_bytes', type: 'bigint' }) sizeBytes!: string;
  @Column({ type: 'text' }) sha256!: string;
  @Column({ name: 'csv_mapping', type: 'jsonb', nullable: true }) csvMapping!: unknown;
  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' }) createdAt!: Date;
}
