// Halden Reach University: the invented institution of Kinpath's demo.
// Departments, programmes and courses; nothing here describes a real place.

export const DEPARTMENTS = [
  { code: 'CMP', name: 'Computing', style: [0.9, 0.2, 0.1, 0.3] },
  { code: 'MTH', name: 'Mathematics', style: [1.0, 0.1, 0.0, 0.1] },
  { code: 'PHY', name: 'Physics', style: [0.8, 0.1, 0.7, 0.0] },
  { code: 'CHM', name: 'Chemistry', style: [0.6, 0.1, 0.9, 0.0] },
  { code: 'BIO', name: 'Biology', style: [0.3, 0.3, 0.9, 0.1] },
  { code: 'ENV', name: 'Environmental Studies', style: [0.3, 0.5, 0.6, 0.3] },
  { code: 'ECO', name: 'Economics', style: [0.7, 0.5, 0.0, 0.1] },
  { code: 'PSY', name: 'Psychology', style: [0.4, 0.6, 0.4, 0.2] },
  { code: 'HIS', name: 'History', style: [0.0, 1.0, 0.0, 0.3] },
  { code: 'LIT', name: 'Literature', style: [0.0, 0.9, 0.0, 0.7] },
  { code: 'ART', name: 'Art and Design', style: [0.0, 0.3, 0.2, 1.0] },
  { code: 'MUS', name: 'Music', style: [0.3, 0.2, 0.1, 1.0] },
];

export const PROGRAMMES = [
  { name: 'Computing BSc', home: 'CMP', near: ['MTH', 'PHY', 'ECO'] },
  { name: 'Data and Society BSc', home: 'CMP', near: ['ECO', 'PSY', 'MTH'] },
  { name: 'Mathematics BSc', home: 'MTH', near: ['CMP', 'PHY', 'ECO'] },
  { name: 'Physics BSc', home: 'PHY', near: ['MTH', 'CHM', 'CMP'] },
  { name: 'Chemistry BSc', home: 'CHM', near: ['BIO', 'PHY', 'ENV'] },
  { name: 'Biology BSc', home: 'BIO', near: ['CHM', 'ENV', 'PSY'] },
  { name: 'Environmental Studies BA', home: 'ENV', near: ['BIO', 'ECO', 'HIS'] },
  { name: 'Economics BA', home: 'ECO', near: ['MTH', 'HIS', 'PSY'] },
  { name: 'Psychology BA', home: 'PSY', near: ['BIO', 'ECO', 'LIT'] },
  { name: 'History BA', home: 'HIS', near: ['LIT', 'ECO', 'ART'] },
  { name: 'Literature BA', home: 'LIT', near: ['HIS', 'ART', 'MUS'] },
  { name: 'Art and Design BA', home: 'ART', near: ['MUS', 'LIT', 'CMP'] },
  { name: 'Music BA', home: 'MUS', near: ['ART', 'LIT', 'PHY'] },
];

// Course titles per department: invented, ordered roughly by level.
export const TITLES = {
  CMP: ['Programming Foundations', 'Discrete Structures', 'Data Structures', 'Computer Organisation', 'Databases', 'Algorithms', 'Operating Systems', 'Networks', 'Software Engineering', 'Human-Computer Interaction', 'Machine Learning', 'Compilers', 'Computer Graphics', 'Distributed Systems'],
  MTH: ['Calculus I', 'Linear Algebra', 'Calculus II', 'Probability', 'Differential Equations', 'Statistics', 'Real Analysis', 'Abstract Algebra', 'Numerical Methods', 'Topology', 'Combinatorics', 'Optimisation', 'Complex Analysis'],
  PHY: ['Mechanics', 'Waves and Optics', 'Electricity and Magnetism', 'Thermal Physics', 'Modern Physics', 'Quantum Mechanics', 'Astrophysics', 'Solid State Physics', 'Experimental Methods', 'Computational Physics', 'Particle Physics', 'Fluid Dynamics'],
  CHM: ['General Chemistry', 'Organic Chemistry I', 'Analytical Chemistry', 'Organic Chemistry II', 'Physical Chemistry', 'Inorganic Chemistry', 'Biochemistry', 'Spectroscopy', 'Environmental Chemistry', 'Polymer Chemistry', 'Medicinal Chemistry', 'Laboratory Practice'],
  BIO: ['Cell Biology', 'Genetics', 'Ecology', 'Evolution', 'Microbiology', 'Physiology', 'Molecular Biology', 'Botany', 'Marine Biology', 'Immunology', 'Neurobiology', 'Field Methods'],
  ENV: ['Earth Systems', 'Climate Science', 'Environmental Policy', 'Sustainable Cities', 'Water Resources', 'Conservation', 'Geographic Information', 'Energy Transitions', 'Coastal Environments', 'Environmental Ethics', 'Field Studies'],
  ECO: ['Principles of Economics', 'Microeconomics', 'Macroeconomics', 'Econometrics', 'Public Finance', 'Labour Economics', 'International Trade', 'Development Economics', 'Behavioural Economics', 'Game Theory', 'Financial Markets', 'Economic History'],
  PSY: ['Introduction to Psychology', 'Research Methods', 'Developmental Psychology', 'Cognitive Psychology', 'Social Psychology', 'Biological Psychology', 'Personality', 'Clinical Psychology', 'Perception', 'Health Psychology', 'Psychology of Learning'],
  HIS: ['World History', 'Medieval Europe', 'The Early Modern World', 'Maritime History', 'History of Science', 'Revolutions', 'Empires and Colonies', 'Twentieth Century', 'Public History', 'Oral History', 'Historiography', 'History of the North Sea'],
  LIT: ['Reading Literature', 'Poetry', 'The Novel', 'Drama', 'World Literatures', 'Literary Theory', 'Creative Writing', 'Shakespeare and His Time', 'Modernism', 'Children’s Literature', 'Translation Studies', 'Literature and Film'],
  ART: ['Drawing', 'Visual Culture', 'Design Studio', 'Photography', 'Typography', 'Printmaking', 'Art History', 'Digital Media', 'Sculpture', 'Exhibition Practice', 'Illustration', 'Interaction Design'],
  MUS: ['Music Theory', 'Ensemble', 'Aural Skills', 'Music History', 'Composition', 'Music Technology', 'Orchestration', 'Ethnomusicology', 'Performance Practice', 'Sound Design', 'Conducting', 'Jazz Studies'],
};

/** Courses everyone takes: their inverse user frequency is zero. */
export const CORE = [
  { code: 'HRU 1010', title: 'Writing and Inquiry', style: [0.2, 0.8, 0.0, 0.2] },
  { code: 'HRU 1020', title: 'Quantitative Reasoning', style: [0.8, 0.2, 0.0, 0.0] },
];
