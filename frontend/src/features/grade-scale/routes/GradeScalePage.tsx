import Alert from '@mui/material/Alert';
import Typography from '@mui/material/Typography';
import { PageHeader } from '../../../components/PageHeader';
import { useTerms } from '../../catalogue/api/catalogue';
import { useGradeScale } from '../api/gradeScale';
import { GradeScaleForm } from '../components/GradeScaleForm';

export function GradeScalePage() {
  const scale = useGradeScale();
  const terms = useTerms();
  const storedRecords = terms.isSuccess
    ? terms.data.terms.reduce((sum, term) => sum + term.records, 0)
    : null;
  return (
    <>
      <PageHeader
        title="Grade scale"
        lead="The letters and marks term data files may use, the grade points behind each letter, and the lowest letter that passes."
      />
      {scale.isPending ? (
        <Typography role="status" sx={{ color: 'text.secondary' }}>
          Loading the grade scale…
        </Typography>
      ) : scale.isError ? (
        <Alert severity="error" role="alert">
          The grade scale could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <>
          <Typography sx={{ mb: 2 }} className="kp-figures">
            The scale runs from {scale.data.minPoints.toFixed(2)} to{' '}
            {scale.data.maxPoints.toFixed(2)} grade points.
            {storedRecords === 0
              ? ' No term data is stored yet, so saving changes only the scale.'
              : ''}
          </Typography>
          <GradeScaleForm scale={scale.data} storedRecords={storedRecords} />
        </>
      )}
    </>
  );
}
