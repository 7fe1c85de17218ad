import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('digests', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    kind: { type: DataTypes.ENUM('category', 'portfolio'), allowNull: false },
    // 0 for the portfolio digest, so the unique key below also holds for it
    category_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    iso_week: { type: DataTypes.CHAR(8), allowNull: false },
    paper: { type: DataTypes.ENUM('A4', 'LETTER'), allowNull: false },
    pdf: { type: DataTypes.BLOB('long'), allowNull: false },
    sha256: { type: DataTypes.CHAR(64), allowNull: false },
    size_bytes: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    page_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    // subject, key figures and sentences the mail repeats, as rendered into the PDF
    summary: { type: DataTypes.JSON, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('digests', ['category_id', 'iso_week', 'kind'], { name: 'digests_week', unique: true });
  await qi.addIndex('digests', ['iso_week'], { name: 'digests_iso_week' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('digests');
};
